import { z } from 'zod'
import { DETECTOR_STATES, DUE_STATUSES, ENVIRONMENTS, HOUSINGS, DELAY_AGREEMENTS, LOOP_VERDICTS, POSITIONS } from '~/domain/vocabulary'
import { ftsIds, ftsQuery, idParam, isoDate, multi, pagingSchema, type ListSpec, whereBuilder } from '../list-query'

const SORTS = {
  tag: 't.tag',
  site: 's.name',
  customer: 'c.name',
  unit: 'u.tag',
  position: 't.position',
  state: 't.state',
  due: 't.due_status',
  nextDueOn: 't.next_due_on',
  environment: 't.environment',
  housing: 't.housing',
  delay: 't.delay_agreement',
  loop: 't.loop_verdict',
  risk: 't.risk_score',
  lastFunctionalOn: 't.last_functional_on',
  installedOn: 't.installed_on',
} as const

export const deviceQuery = pagingSchema(Object.keys(SORTS) as [keyof typeof SORTS, ...Array<keyof typeof SORTS>]).extend({
  state: multi(DETECTOR_STATES),
  due: multi(DUE_STATUSES),
  environment: multi(ENVIRONMENTS),
  housing: multi(HOUSINGS),
  delay: multi(DELAY_AGREEMENTS),
  loop: multi(LOOP_VERDICTS),
  position: multi(POSITIONS),
  customer: idParam.optional(),
  site: idParam.optional(),
  unit: idParam.optional(),
  assignedTo: idParam.optional(),
  nextDueFrom: isoDate.optional(),
  nextDueTo: isoDate.optional(),
  installedFrom: isoDate.optional(),
  installedTo: isoDate.optional(),
  minRisk: z.coerce.number().int().min(0).optional(),
})
export type DeviceQuery = z.infer<typeof deviceQuery>

export interface DeviceListRow {
  id: number
  tag: string
  siteId: number
  site: string
  city: string
  customerId: number
  customer: string
  unitId: number
  unit: string
  position: string
  state: string
  due: string
  nextDueOn: string | null
  environment: string
  housing: string
  delay: string
  loop: string | null
  risk: number
  lastFunctionalOn: string | null
  installedOn: string
}

export const deviceList: ListSpec<DeviceQuery> = {
  // Left joins, though every detector has all three: SQLite drops an unused left join, so paging and
  // counting over detectors alone stay on the detectors indexes.
  from: 'detectors t left join sites s on s.id = t.site_id left join customers c on c.id = t.customer_id left join units u on u.id = t.unit_id',
  select: {
    id: 't.id',
    tag: 't.tag',
    siteId: 't.site_id',
    site: 's.name',
    city: 's.city',
    customerId: 't.customer_id',
    customer: 'c.name',
    unitId: 't.unit_id',
    unit: 'u.tag',
    position: 't.position',
    state: 't.state',
    due: 't.due_status',
    nextDueOn: 't.next_due_on',
    environment: 't.environment',
    housing: 't.housing',
    delay: 't.delay_agreement',
    loop: 't.loop_verdict',
    risk: 't.risk_score',
    lastFunctionalOn: 't.last_functional_on',
    installedOn: 't.installed_on',
  },
  sorts: SORTS,
  defaultSort: { key: 'risk', dir: 'desc' },
  countedAs: 'detectors',
  where(f) {
    const { add, list, done } = whereBuilder()
    const fts = f.q ? ftsQuery(f.q) : null
    if (fts) add(`t.id in (${ftsIds('detector')})`, fts)
    list('t.state', f.state)
    list('t.due_status', f.due)
    list('t.environment', f.environment)
    list('t.housing', f.housing)
    list('t.delay_agreement', f.delay)
    list('t.loop_verdict', f.loop)
    list('t.position', f.position)
    if (f.customer) add('t.customer_id = ?', f.customer)
    if (f.site) add('t.site_id = ?', f.site)
    if (f.unit) add('t.unit_id = ?', f.unit)
    if (f.assignedTo) add('t.assigned_to = ?', f.assignedTo)
    if (f.nextDueFrom) add('t.next_due_on >= ?', f.nextDueFrom)
    if (f.nextDueTo) add('t.next_due_on <= ?', f.nextDueTo)
    if (f.installedFrom) add('t.installed_on >= ?', f.installedFrom)
    if (f.installedTo) add('t.installed_on <= ?', f.installedTo)
    if (f.minRisk !== undefined) add('t.risk_score >= ?', f.minRisk)
    return done()
  },
}
