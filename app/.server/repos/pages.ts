import type { Db } from '../db'

// Queries for the customer, site and unit pages. A customer can hold over a thousand sites and
// several thousand detectors, so every list here is capped and every query starts from an index on
// the owning row (customer, site or unit); no query reads a whole table.

/** Rows shown in a capped table; the page says "showing N of M" past it. */
export const LIST_CAP = 200
export const DUE_WORK_CAP = 25
export const SITE_EVENTS_CAP = 50
export const SITE_VISITS_CAP = 20
export const SITE_NOTIFICATIONS_CAP = 20

// Visits still ahead of the technician; done and cancelled ones are history.
const OPEN_VISIT = "('planned', 'notified', 'in-progress')"

export interface CustomerRecord {
  id: number
  name: string
  kind: 'restaurant' | 'retail' | 'office' | 'school' | 'healthcare'
  contactName: string | null
  contactEmail: string | null
  contactPhone: string | null
}

export interface CustomerTotals {
  sites: number
  units: number
  detectors: number
  overdue: number
  dueSoon: number
  inTrouble: number
  outOfService: number
  delayDisagrees: number
}

export interface DueWorkRow {
  id: number
  tag: string
  position: 'supply' | 'return'
  state: string
  nextDueOn: string | null
  riskScore: number
  siteId: number
  siteName: string
  unitTag: string
}

export interface CustomerSiteRow {
  id: number
  name: string
  city: string
  detectors: number
  overdue: number
  inTrouble: number
  nextVisitOn: string | null
  nextVisitKind: string | null
}

export function getCustomer(db: Db, id: number): CustomerRecord | undefined {
  return db.$client
    .prepare(
      `select id, name, kind, contact_name as contactName, contact_email as contactEmail, contact_phone as contactPhone
       from customers where id = ?`,
    )
    .get(id) as CustomerRecord | undefined
}

/** One pass over the customer's detectors (detectors_customer_idx) plus two index counts. */
export function customerTotals(db: Db, customerId: number): CustomerTotals {
  const q = db.$client
  const d = q
    .prepare(
      `select count(*) as detectors,
              coalesce(sum(due_status = 'overdue'), 0) as overdue,
              coalesce(sum(due_status = 'due-soon'), 0) as dueSoon,
              coalesce(sum(state = 'trouble'), 0) as inTrouble,
              coalesce(sum(state = 'out-of-service'), 0) as outOfService,
              coalesce(sum(delay_agreement = 'disagree'), 0) as delayDisagrees
       from detectors where customer_id = ?`,
    )
    .get(customerId) as Omit<CustomerTotals, 'sites' | 'units'>
  const sites = (q.prepare('select count(*) as n from sites where customer_id = ?').get(customerId) as { n: number }).n
  const units = (
    q
      .prepare('select count(*) as n from sites s join units u on u.site_id = s.id where s.customer_id = ?')
      .get(customerId) as { n: number }
  ).n
  return { sites, units, ...d }
}

/** The customer's most overdue detectors: the earliest next-due dates among those already overdue. */
export function customerDueWork(db: Db, customerId: number, limit = DUE_WORK_CAP): DueWorkRow[] {
  return db.$client
    .prepare(
      `select d.id, d.tag, d.position, d.state, d.next_due_on as nextDueOn, d.risk_score as riskScore,
              s.id as siteId, s.name as siteName, u.tag as unitTag
       from detectors d
       join sites s on s.id = d.site_id
       join units u on u.id = d.unit_id
       where d.customer_id = ? and d.due_status = 'overdue'
       order by d.next_due_on, d.risk_score desc, d.id
       limit ?`,
    )
    .all(customerId, limit) as DueWorkRow[]
}

/**
 * The customer's sites, worst first. Detector figures come from one grouped pass over the
 * customer's detectors; the next visit is looked up (visits_site_idx) only for the rows shown.
 */
export function customerSites(db: Db, customerId: number, today: string, limit = LIST_CAP): CustomerSiteRow[] {
  return db.$client
    .prepare(
      `select t.*,
              (select v.scheduled_on from visits v
                where v.site_id = t.id and v.scheduled_on >= ? and v.status in ${OPEN_VISIT}
                order by v.scheduled_on limit 1) as nextVisitOn,
              (select v.kind from visits v
                where v.site_id = t.id and v.scheduled_on >= ? and v.status in ${OPEN_VISIT}
                order by v.scheduled_on, v.id limit 1) as nextVisitKind
       from (
         select s.id, s.name, s.city,
                coalesce(a.detectors, 0) as detectors, coalesce(a.overdue, 0) as overdue,
                coalesce(a.inTrouble, 0) as inTrouble
         from sites s
         left join (
           select site_id, count(*) as detectors, sum(due_status = 'overdue') as overdue,
                  sum(state = 'trouble') as inTrouble
           from detectors where customer_id = ? group by site_id
         ) a on a.site_id = s.id
         where s.customer_id = ?
         order by overdue desc, inTrouble desc, s.name, s.id
         limit ?
       ) t
       order by t.overdue desc, t.inTrouble desc, t.name, t.id`,
    )
    .all(today, today, customerId, customerId, limit) as CustomerSiteRow[]
}

export interface SiteRecord {
  id: number
  name: string
  street: string
  city: string
  region: string
  postalCode: string
  timeZone: string
  jurisdiction: string
  ahjName: string
  ahjContact: string | null
  codeBasis: 'nfpa90a' | 'imc'
  monitoringAccount: string | null
  delayPolicySeconds: number
  accessNotes: string | null
  customerId: number
  customerName: string
  monitoring: {
    name: string
    phone: string
    email: string | null
    notifyMethod: 'phone' | 'email' | 'portal'
    notifyLeadMinutes: number
    hours: string
    notes: string | null
  } | null
}

export function getSite(db: Db, id: number): SiteRecord | undefined {
  const row = db.$client
    .prepare(
      `select s.id, s.name, s.street, s.city, s.region, s.postal_code as postalCode, s.time_zone as timeZone,
              s.jurisdiction, s.ahj_name as ahjName, s.ahj_contact as ahjContact, s.code_basis as codeBasis,
              s.monitoring_account as monitoringAccount, s.delay_policy_seconds as delayPolicySeconds,
              s.access_notes as accessNotes, c.id as customerId, c.name as customerName,
              mc.id as mcId, mc.name as mcName, mc.phone as mcPhone, mc.email as mcEmail,
              mc.notify_method as mcNotifyMethod, mc.notify_lead_minutes as mcLeadMinutes, mc.hours as mcHours,
              mc.notes as mcNotes
       from sites s
       join customers c on c.id = s.customer_id
       left join monitoring_companies mc on mc.id = s.monitoring_company_id
       where s.id = ?`,
    )
    .get(id) as
    | (Omit<SiteRecord, 'monitoring'> & {
        mcId: number | null
        mcName: string
        mcPhone: string
        mcEmail: string | null
        mcNotifyMethod: 'phone' | 'email' | 'portal'
        mcLeadMinutes: number
        mcHours: string
        mcNotes: string | null
      })
    | undefined
  if (!row) return undefined
  const { mcId, mcName, mcPhone, mcEmail, mcNotifyMethod, mcLeadMinutes, mcHours, mcNotes, ...site } = row
  return {
    ...site,
    monitoring:
      mcId === null
        ? null
        : {
            name: mcName,
            phone: mcPhone,
            email: mcEmail,
            notifyMethod: mcNotifyMethod,
            notifyLeadMinutes: mcLeadMinutes,
            hours: mcHours,
            notes: mcNotes,
          },
  }
}

export interface SiteUnitRow {
  id: number
  tag: string
  kind: string
  location: string | null
  shutdownInput: 'break-to-stop' | 'make-to-stop'
  supplyCfm: number
  returnCfm: number
  detectors: number
}

export interface SiteDetectorRow {
  id: number
  tag: string
  position: 'supply' | 'return'
  state: string
  dueStatus: string
  nextDueOn: string | null
  riskScore: number
  unitId: number
  unitTag: string
}

export interface SiteVisitRow {
  id: number
  scheduledOn: string
  kind: string
  status: string
  technician: string | null
  detectors: number
}

export interface SiteNotificationRow {
  id: number
  notifiedAt: string
  notifiedBy: string | null
  method: 'phone' | 'email' | 'portal'
  spokeWith: string
  confirmation: string | null
  inTestFrom: string
  inTestUntil: string
  siteContactTold: string | null
  clearedAt: string | null
  monitoringName: string | null
}

export interface SiteEventRow {
  id: number
  occurredAt: string
  kind: string
  detail: string | null
  by: string | null
  detectorId: number | null
  detectorTag: string | null
}

export function siteCounts(db: Db, siteId: number) {
  const q = db.$client
  const n = (sql: string) => (q.prepare(sql).get(siteId) as { n: number }).n
  return {
    units: n('select count(*) as n from units where site_id = ?'),
    detectors: n('select count(*) as n from detectors where site_id = ?'),
    notifications: n('select count(*) as n from notifications where site_id = ?'),
  }
}

export function siteUnits(db: Db, siteId: number, limit = LIST_CAP): SiteUnitRow[] {
  return db.$client
    .prepare(
      `select u.id, u.tag, u.kind, u.location, u.shutdown_input as shutdownInput, u.supply_cfm as supplyCfm,
              u.return_cfm as returnCfm, (select count(*) from detectors d where d.unit_id = u.id) as detectors
       from units u where u.site_id = ? order by u.tag limit ?`,
    )
    .all(siteId, limit) as SiteUnitRow[]
}

export function siteDetectors(db: Db, siteId: number, limit = LIST_CAP): SiteDetectorRow[] {
  return db.$client
    .prepare(
      `select d.id, d.tag, d.position, d.state, d.due_status as dueStatus, d.next_due_on as nextDueOn,
              d.risk_score as riskScore, u.id as unitId, u.tag as unitTag
       from detectors d join units u on u.id = d.unit_id
       where d.site_id = ? order by d.tag limit ?`,
    )
    .all(siteId, limit) as SiteDetectorRow[]
}

export function siteUpcomingVisits(db: Db, siteId: number, today: string, limit = SITE_VISITS_CAP) {
  const q = db.$client
  const rows = q
    .prepare(
      `select v.id, v.scheduled_on as scheduledOn, v.kind, v.status, u.name as technician,
              (select count(*) from visit_detectors vd where vd.visit_id = v.id) as detectors
       from visits v left join users u on u.id = v.technician_id
       where v.site_id = ? and v.scheduled_on >= ? and v.status in ${OPEN_VISIT}
       order by v.scheduled_on, v.id limit ?`,
    )
    .all(siteId, today, limit) as SiteVisitRow[]
  const total = (
    q
      .prepare(`select count(*) as n from visits where site_id = ? and scheduled_on >= ? and status in ${OPEN_VISIT}`)
      .get(siteId, today) as { n: number }
  ).n
  return { rows, total }
}

export function siteNotifications(db: Db, siteId: number, limit = SITE_NOTIFICATIONS_CAP): SiteNotificationRow[] {
  return db.$client
    .prepare(
      `select n.id, n.notified_at as notifiedAt, u.name as notifiedBy, n.method, n.spoke_with as spokeWith,
              n.confirmation, n.in_test_from as inTestFrom, n.in_test_until as inTestUntil,
              n.site_contact_told as siteContactTold, n.cleared_at as clearedAt, mc.name as monitoringName
       from notifications n
       left join users u on u.id = n.notified_by
       left join monitoring_companies mc on mc.id = n.monitoring_company_id
       where n.site_id = ? order by n.notified_at desc, n.id desc limit ?`,
    )
    .all(siteId, limit) as SiteNotificationRow[]
}

/** The site's latest events, newest first, read backwards along events_site_idx. */
export function siteEvents(db: Db, siteId: number, limit = SITE_EVENTS_CAP): SiteEventRow[] {
  return db.$client
    .prepare(
      `select e.id, e.occurred_at as occurredAt, e.kind, e.detail, u.name as by,
              e.detector_id as detectorId, d.tag as detectorTag
       from events e
       left join users u on u.id = e.user_id
       left join detectors d on d.id = e.detector_id
       where e.site_id = ? order by e.occurred_at desc limit ?`,
    )
    .all(siteId, limit) as SiteEventRow[]
}

export interface UnitRecord {
  id: number
  tag: string
  kind: string
  location: string | null
  shutdownInput: 'break-to-stop' | 'make-to-stop'
  supplyCfm: number
  returnCfm: number
  ductShape: 'rectangular' | 'round'
  ductWidthIn: number | null
  ductHeightIn: number | null
  ductDiameterIn: number | null
  storeysServed: number
  sharedPlenum: number
  areaDetection: number
  transformerVa: number
  siteId: number
  siteName: string
  city: string
  codeBasis: 'nfpa90a' | 'imc'
  ahjName: string
  customerId: number
  customerName: string
  monitoringName: string | null
  monitoringPhone: string | null
  monitoringNotifyMethod: 'phone' | 'email' | 'portal' | null
}

export function getUnit(db: Db, id: number): UnitRecord | undefined {
  return db.$client
    .prepare(
      `select u.id, u.tag, u.kind, u.location, u.shutdown_input as shutdownInput, u.supply_cfm as supplyCfm,
              u.return_cfm as returnCfm, u.duct_shape as ductShape, u.duct_width_in as ductWidthIn,
              u.duct_height_in as ductHeightIn, u.duct_diameter_in as ductDiameterIn,
              u.storeys_served as storeysServed, u.shared_plenum as sharedPlenum, u.area_detection as areaDetection,
              u.transformer_va as transformerVa,
              s.id as siteId, s.name as siteName, s.city, s.code_basis as codeBasis, s.ahj_name as ahjName,
              c.id as customerId, c.name as customerName,
              mc.name as monitoringName, mc.phone as monitoringPhone, mc.notify_method as monitoringNotifyMethod
       from units u
       join sites s on s.id = u.site_id
       join customers c on c.id = s.customer_id
       left join monitoring_companies mc on mc.id = s.monitoring_company_id
       where u.id = ?`,
    )
    .get(id) as UnitRecord | undefined
}

export interface UnitDetectorRow {
  id: number
  tag: string
  position: 'supply' | 'return'
  state: string
  dueStatus: string
  nextDueOn: string | null
  conductorAwg: 18 | 16 | 14 | 12
  conductorStranded: number
  testStation: 'none' | 'key' | 'magnet'
  testStationFeet: number | null
  velocityMinFpm: number
  velocityMaxFpm: number
  modelName: string
  standbyVa: number
  alarmVa: number
}

export function unitDetectors(db: Db, unitId: number, limit = LIST_CAP): UnitDetectorRow[] {
  return db.$client
    .prepare(
      `select d.id, d.tag, d.position, d.state, d.due_status as dueStatus, d.next_due_on as nextDueOn,
              d.conductor_awg as conductorAwg, d.conductor_stranded as conductorStranded,
              d.test_station as testStation, d.test_station_feet as testStationFeet,
              d.velocity_min_fpm as velocityMinFpm, d.velocity_max_fpm as velocityMaxFpm,
              m.name as modelName, m.standby_va as standbyVa, m.alarm_va as alarmVa
       from detectors d join detector_models m on m.id = d.model_id
       where d.unit_id = ? order by d.position desc, d.tag limit ?`,
    )
    .all(unitId, limit) as UnitDetectorRow[]
}
