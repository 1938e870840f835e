import { z } from 'zod'
import type { Db } from '../db'
import { idParam } from '../list-query'

/** A record route's id from its path: 400 with the issues when it is not a positive whole number. */
export function recordId(params: Record<string, string | undefined>, name: string): number {
  const parsed = z.object({ [name]: idParam }).safeParse(params)
  if (!parsed.success) {
    throw Response.json(
      { error: 'Invalid id', issues: parsed.error.issues.map((i) => ({ path: i.path.join('.'), message: i.message })) },
      { status: 400 },
    )
  }
  return parsed.data[name] as number
}

export const notFound = (what: string) => Response.json({ error: `No such ${what}.` }, { status: 404 })

// Related rows are capped so one unusually large record cannot turn into a huge response.
const SITES_CAP = 200
const DETECTORS_CAP = 500
const UPCOMING_VISITS = 10
const NOTIFICATIONS = 20
const EVENTS = 50

const one = <T>(db: Db, sql: string, ...params: unknown[]) => db.$client.prepare(sql).get(...params) as T | undefined
const all = <T>(db: Db, sql: string, ...params: unknown[]) => db.$client.prepare(sql).all(...params) as T[]

const CUSTOMER_COLUMNS = `c.id, c.name, c.kind, c.contact_name as contactName, c.contact_email as contactEmail,
  c.contact_phone as contactPhone, c.created_at as createdAt`
const SITE_COLUMNS = `s.id, s.name, s.street, s.city, s.region, s.postal_code as postalCode, s.time_zone as timeZone,
  s.jurisdiction, s.ahj_name as ahjName, s.ahj_contact as ahjContact, s.code_basis as codeBasis,
  s.monitoring_account as monitoringAccount, s.delay_policy_seconds as delayPolicySeconds, s.access_notes as accessNotes`
const DETECTOR_COLUMNS = `d.id, d.tag, d.unit_id as unitId, u.tag as unit, d.position, d.state, d.due_status as due,
  d.next_due_on as nextDueOn, d.risk_score as risk`

export interface DetectorBrief {
  id: number
  tag: string
  unitId: number
  unit: string
  position: string
  state: string
  due: string
  nextDueOn: string | null
  risk: number
}

export function customerRecord(db: Db, id: number) {
  const customer = one<Record<string, unknown>>(db, `select ${CUSTOMER_COLUMNS} from customers c where c.id = ?`, id)
  if (!customer) return null
  // detectors_customer_idx narrows to this customer's detectors; the sums read each of them once.
  const detectors = one<{ detectors: number; overdue: number | null; dueSoon: number | null; inTrouble: number | null }>(
    db,
    `select count(*) as detectors, sum(due_status = 'overdue') as overdue, sum(due_status = 'due-soon') as dueSoon,
            sum(state = 'trouble') as inTrouble
     from detectors where customer_id = ?`,
    id,
  )!
  const places = one<{ sites: number; units: number }>(
    db,
    `select (select count(*) from sites where customer_id = @id) as sites,
            (select count(*) from units where site_id in (select id from sites where customer_id = @id)) as units`,
    { id },
  )!
  const sites = all<{ id: number; name: string; city: string; detectors: number; overdue: number }>(
    db,
    `select s.id, s.name, s.city,
            (select count(*) from detectors x where x.site_id = s.id) as detectors,
            (select count(*) from detectors x where x.site_id = s.id and x.due_status = 'overdue') as overdue
     from sites s where s.customer_id = ? order by s.name, s.id limit ?`,
    id,
    SITES_CAP,
  )
  return {
    customer,
    totals: {
      sites: places.sites,
      units: places.units,
      detectors: detectors.detectors,
      overdue: detectors.overdue ?? 0,
      dueSoon: detectors.dueSoon ?? 0,
      inTrouble: detectors.inTrouble ?? 0,
    },
    sites,
  }
}

export function siteRecord(db: Db, id: number, today: string) {
  const site = one<Record<string, unknown> & { customerId: number; monitoringCompanyId: number | null }>(
    db,
    `select ${SITE_COLUMNS}, s.customer_id as customerId, s.monitoring_company_id as monitoringCompanyId
     from sites s where s.id = ?`,
    id,
  )
  if (!site) return null
  const customer = one<{ id: number; name: string; kind: string }>(db, 'select id, name, kind from customers where id = ?', site.customerId)
  const monitoring =
    site.monitoringCompanyId === null
      ? null
      : (one<Record<string, unknown>>(
          db,
          `select id, name, phone, email, notify_method as notifyMethod, notify_lead_minutes as notifyLeadMinutes, hours
           from monitoring_companies where id = ?`,
          site.monitoringCompanyId,
        ) ?? null)
  const units = all<Record<string, unknown>>(
    db,
    `select u.id, u.tag, u.kind, u.location, u.shutdown_input as shutdownInput, u.supply_cfm as supplyCfm,
            u.return_cfm as returnCfm, (select count(*) from detectors x where x.unit_id = u.id) as detectors
     from units u where u.site_id = ? order by u.tag, u.id`,
    id,
  )
  const detectors = all<DetectorBrief>(
    db,
    `select ${DETECTOR_COLUMNS} from detectors d join units u on u.id = d.unit_id
     where d.site_id = ? order by d.tag, d.id limit ?`,
    id,
    DETECTORS_CAP,
  )
  const upcomingVisits = all<Record<string, unknown>>(
    db,
    `select v.id, v.scheduled_on as scheduledOn, v.kind, v.status, v.technician_id as technicianId, u.name as technician,
            (select count(*) from visit_detectors x where x.visit_id = v.id) as detectors
     from visits v left join users u on u.id = v.technician_id
     where v.site_id = ? and v.scheduled_on >= ? and v.status in ('planned', 'notified', 'in-progress')
     order by v.scheduled_on, v.id limit ?`,
    id,
    today,
    UPCOMING_VISITS,
  )
  const notifications = all<Record<string, unknown>>(
    db,
    `select n.id, n.visit_id as visitId, n.notified_at as notifiedAt, n.method, n.spoke_with as spokeWith,
            n.confirmation, n.in_test_from as inTestFrom, n.in_test_until as inTestUntil,
            n.site_contact_told as siteContactTold, n.cleared_at as clearedAt, u.name as notifiedBy
     from notifications n left join users u on u.id = n.notified_by
     where n.site_id = ? order by n.notified_at desc, n.id desc limit ?`,
    id,
    NOTIFICATIONS,
  )
  const events = all<Record<string, unknown>>(
    db,
    `select e.id, e.occurred_at as occurredAt, e.kind, e.detail, e.detector_id as detectorId, d.tag as detectorTag, u.name as by
     from events e left join detectors d on d.id = e.detector_id left join users u on u.id = e.user_id
     where e.site_id = ? order by e.occurred_at desc, e.id desc limit ?`,
    id,
    EVENTS,
  )
  return { site, customer, monitoring, units, detectors, upcomingVisits, notifications, events }
}

export function unitRecord(db: Db, id: number) {
  const unit = one<Record<string, unknown> & { siteId: number }>(
    db,
    `select u.id, u.tag, u.kind, u.location, u.shutdown_input as shutdownInput, u.supply_cfm as supplyCfm,
            u.return_cfm as returnCfm, u.duct_shape as ductShape, u.duct_width_in as ductWidthIn,
            u.duct_height_in as ductHeightIn, u.duct_diameter_in as ductDiameterIn, u.storeys_served as storeysServed,
            u.shared_plenum as sharedPlenum, u.area_detection as areaDetection, u.transformer_va as transformerVa,
            u.site_id as siteId
     from units u where u.id = ?`,
    id,
  )
  if (!unit) return null
  const site = one<Record<string, unknown>>(
    db,
    `select s.id, s.name, s.city, s.code_basis as codeBasis, s.customer_id as customerId, c.name as customer
     from sites s join customers c on c.id = s.customer_id where s.id = ?`,
    unit.siteId,
  )
  const detectors = all<DetectorBrief>(
    db,
    `select ${DETECTOR_COLUMNS} from detectors d join units u on u.id = d.unit_id
     where d.unit_id = ? order by d.position desc, d.tag, d.id limit ?`,
    id,
    DETECTORS_CAP,
  )
  return { unit: { ...unit, sharedPlenum: unit.sharedPlenum === 1, areaDetection: unit.areaDetection === 1 }, site, detectors }
}

export function visitRecord(db: Db, id: number) {
  const visit = one<Record<string, unknown> & { siteId: number; technicianId: number | null }>(
    db,
    `select v.id, v.kind, v.scheduled_on as scheduledOn, v.status, v.notes, v.version, v.created_at as createdAt,
            v.site_id as siteId, v.technician_id as technicianId, cb.name as createdBy
     from visits v left join users cb on cb.id = v.created_by where v.id = ?`,
    id,
  )
  if (!visit) return null
  const site = one<Record<string, unknown>>(
    db,
    `select s.id, s.name, s.street, s.city, s.region, s.access_notes as accessNotes, s.customer_id as customerId,
            c.name as customer, m.name as monitoring, m.phone as monitoringPhone, m.notify_method as notifyMethod,
            m.notify_lead_minutes as notifyLeadMinutes
     from sites s join customers c on c.id = s.customer_id left join monitoring_companies m on m.id = s.monitoring_company_id
     where s.id = ?`,
    visit.siteId,
  )
  const technician =
    visit.technicianId === null
      ? null
      : (one<{ id: number; name: string; email: string }>(db, 'select id, name, email from users where id = ?', visit.technicianId) ?? null)
  const detectors = all<DetectorBrief & { tasks: string; result: string; notes: string | null; completedAt: string | null }>(
    db,
    `select ${DETECTOR_COLUMNS}, vd.tasks, vd.result, vd.notes, vd.completed_at as completedAt
     from visit_detectors vd join detectors d on d.id = vd.detector_id join units u on u.id = d.unit_id
     where vd.visit_id = ? order by d.tag, d.id limit ?`,
    id,
    DETECTORS_CAP,
  ).map((d) => ({ ...d, tasks: d.tasks.split(',').filter(Boolean) }))
  const notifications = all<Record<string, unknown>>(
    db,
    `select n.id, n.notified_at as notifiedAt, n.method, n.spoke_with as spokeWith, n.confirmation,
            n.in_test_from as inTestFrom, n.in_test_until as inTestUntil, n.site_contact_told as siteContactTold,
            n.cleared_at as clearedAt, u.name as notifiedBy
     from notifications n left join users u on u.id = n.notified_by
     where n.visit_id = ? order by n.notified_at, n.id`,
    id,
  )
  return { visit, site, technician, detectors, notifications }
}
