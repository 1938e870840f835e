// The audit log in sentences: "Priya Castellano acknowledged 3 detectors at Harbor Lantern Eastlake",
// with names and links in place of ids. Pure: the caller looks the names up (in batches) and passes them.
import { changedFields, fieldLabel, readableDay, type BulkRecord, type Change, type Named } from './audit-values'
import { ROLE_LABELS, isRole } from './permissions'

export interface AuditRow {
  id: number
  at: string
  actorId: number | null
  action: string
  entity: string
  entityId: string | null
  before: unknown
  after: unknown
}

export interface Link {
  text: string
  href: string | null
}
export type Part = string | Link

export interface AuditItem {
  /** The newest entry's id: the item's key. */
  id: number
  at: string
  kind: AuditKind | 'other'
  parts: Part[]
  changes: Change[]
  /** For several records changed at once: each record, for the details. */
  records: Part[][]
}

/** Kinds of change, for the filter; each is a set of action prefixes. */
export const AUDIT_KINDS = [
  { key: 'people', label: 'People', prefixes: ['user.'] },
  { key: 'tokens', label: 'API tokens', prefixes: ['token.'] },
  { key: 'triage', label: 'Triage', prefixes: ['triage.'] },
  { key: 'visits', label: 'Visits', prefixes: ['visit.', 'attachment.'] },
  { key: 'records', label: 'Records', prefixes: ['customer.', 'site.', 'unit.', 'detector.'] },
  { key: 'bulk', label: 'Bulk changes', prefixes: ['bulk.'] },
  { key: 'imports', label: 'Imports', prefixes: ['import.'] },
  { key: 'calendar', label: 'Company calendar', prefixes: ['calendar.'] },
  { key: 'views', label: 'Saved views', prefixes: ['view.'] },
  { key: 'sign-ins', label: 'Sign-ins', prefixes: ['session.'] },
] as const
export type AuditKind = (typeof AUDIT_KINDS)[number]['key']
export const AUDIT_KIND_KEYS = AUDIT_KINDS.map((k) => k.key) as [AuditKind, ...AuditKind[]]

/** Routine sign-ins and sign-outs, hidden unless asked for; refused sign-ins always show. */
export const ROUTINE_SESSION_ACTIONS = ['session.sign-in', 'session.sign-out']

export function kindOf(action: string): AuditKind | 'other' {
  return AUDIT_KINDS.find((k) => k.prefixes.some((p) => action.startsWith(p)))?.key ?? 'other'
}

export interface SentenceOptions {
  timeZone: string
  /** Whether the reader may open the users page (people link there only then). */
  linkPeople: boolean
}

// ——— ids to look up ———

export interface IdsWanted {
  users: Set<number>
  detectors: Set<number>
  sites: Set<number>
  visits: Set<number>
  units: Set<number>
  customers: Set<number>
  tokens: Set<number>
  views: Set<number>
  attachments: Set<number>
  bulk: Set<number>
}

const ENTITY_TABLE: Record<string, keyof IdsWanted> = {
  user: 'users',
  detector: 'detectors',
  site: 'sites',
  visit: 'visits',
  unit: 'units',
  customer: 'customers',
  api_token: 'tokens',
  saved_view: 'views',
  attachment: 'attachments',
}
const KEY_TABLE: Record<string, keyof IdsWanted> = {
  userId: 'users',
  technicianId: 'users',
  assignedTo: 'users',
  acknowledgedBy: 'users',
  undoneBy: 'users',
  siteId: 'sites',
  detectorId: 'detectors',
  visitId: 'visits',
  unitId: 'units',
  customerId: 'customers',
}

const asRecord = (v: unknown): Record<string, unknown> | null => (v && typeof v === 'object' && !Array.isArray(v) ? (v as Record<string, unknown>) : null)
const numeric = (v: unknown): number | null => {
  const n = typeof v === 'string' && /^\d+$/.test(v) ? Number(v) : v
  return typeof n === 'number' && Number.isInteger(n) && n > 0 ? n : null
}

/** The records a bulk entry lists, however it lists them: `after.records`, `after` itself, `after.detectors`. */
function listedRecords(value: unknown): Array<Record<string, unknown>> {
  const list = Array.isArray(value) ? value : (asRecord(value)?.records ?? asRecord(value)?.detectors)
  return Array.isArray(list) ? list.map((r) => asRecord(r) ?? (numeric(r) ? { id: r } : {})) : []
}

const isBulk = (r: AuditRow) => r.action.startsWith('bulk.')

/** Which table a bulk entry's listed records live in. */
function listedEntity(row: AuditRow): string | null {
  const declared = asRecord(row.after)?.entity ?? asRecord(row.before)?.entity
  if (typeof declared === 'string') return declared.replace(/s$/, '')
  if (ENTITY_TABLE[row.entity]) return row.entity
  if (row.action === 'bulk.reschedule') return 'visit'
  return null
}

/** Every id the page's entries name, by table, so each table is read once for the whole page. */
export function idsToLookUp(rows: AuditRow[]): IdsWanted {
  const want: IdsWanted = { users: new Set(), detectors: new Set(), sites: new Set(), visits: new Set(), units: new Set(), customers: new Set(), tokens: new Set(), views: new Set(), attachments: new Set(), bulk: new Set() }
  const scan = (value: unknown, depth: number) => {
    const rec = asRecord(value)
    if (!rec || depth > 2) return
    for (const [k, v] of Object.entries(rec)) {
      const table = KEY_TABLE[k]
      const n = numeric(v)
      if (table && n) want[table].add(n)
      else if (Array.isArray(v)) for (const item of v.slice(0, 50)) scan(item, depth + 1)
    }
  }
  for (const r of rows) {
    if (r.actorId) want.users.add(r.actorId)
    const table = ENTITY_TABLE[r.entity]
    const id = numeric(r.entityId)
    // A bulk entry's id is its change's; the records it touched are listed in the change.
    if (isBulk(r) && id) want.bulk.add(id)
    else if (table && id) want[table].add(id)
    scan(r.before, 0)
    scan(r.after, 0)
    const listed = listedEntity(r)
    const listedTable = listed ? ENTITY_TABLE[listed] : undefined
    if (listedTable) {
      for (const rec of listedRecords(r.after).slice(0, 50)) {
        const n = numeric(rec.id)
        if (n) want[listedTable].add(n)
      }
    }
  }
  return want
}

// ——— grouping ———

const GROUP_WINDOW_MS = 5_000

/**
 * Entries one person wrote for several records in one go (acknowledging 3 detectors writes 3)
 * become one item: same person, action and kind of record, written within a few seconds.
 * `rows` run newest first, as the page lists them.
 */
export function groupEntries(rows: AuditRow[]): AuditRow[][] {
  const groups: AuditRow[][] = []
  for (const r of rows) {
    const last = groups.at(-1)
    const head = last?.[0]
    if (
      last &&
      head &&
      head.actorId === r.actorId &&
      head.action === r.action &&
      head.entity === r.entity &&
      r.entityId !== null &&
      !r.action.startsWith('session.') &&
      !isBulk(r) &&
      !r.action.startsWith('import.') &&
      !last.some((x) => x.entityId === r.entityId) &&
      Math.abs(Date.parse(last.at(-1)!.at) - Date.parse(r.at)) <= GROUP_WINDOW_MS
    ) {
      last.push(r)
    } else {
      groups.push([r])
    }
  }
  return groups
}

// ——— naming records ———

const plural = (n: number, one: string, many = `${one}s`) => `${n.toLocaleString('en-US')} ${n === 1 ? one : many}`
const quoted = (s: string) => `“${s}”`

const NOUNS: Record<string, [string, string]> = {
  detector: ['detector', 'detectors'],
  site: ['site', 'sites'],
  visit: ['visit', 'visits'],
  unit: ['unit', 'units'],
  customer: ['customer', 'customers'],
  user: ['person', 'people'],
  api_token: ['API token', 'API tokens'],
  saved_view: ['saved view', 'saved views'],
  attachment: ['file', 'files'],
  bulk_change: ['bulk change', 'bulk changes'],
}
const nounFor = (entity: string, n: number) => {
  const [one, many] = NOUNS[entity] ?? [entity.replace(/_/g, ' '), `${entity.replace(/_/g, ' ')}s`]
  return n === 1 ? one : many
}

class Namer {
  constructor(
    private names: Named,
    private o: SentenceOptions,
  ) {}

  person(id: number | null | undefined): Part {
    if (!id) return 'nobody'
    const u = this.names.users[id]
    if (!u) return `person #${id}`
    return this.o.linkPeople ? { text: u.name, href: `/admin/users#user-${id}` } : u.name
  }

  site(id: number, name?: string): Part {
    const n = name ?? this.names.sites[id]?.name
    return n ? { text: n, href: `/sites/${id}` } : `site #${id}`
  }

  /** The site shared by all the records, or null when they sit at several. */
  commonSite(entity: string, ids: number[]): { id: number; name: string } | null {
    const sites = new Map<number, string>()
    for (const id of ids) {
      const r = entity === 'detector' ? this.names.detectors[id] : entity === 'unit' ? this.names.units[id] : entity === 'visit' ? this.names.visits[id] : undefined
      if (!r) return null
      sites.set(r.siteId, r.siteName)
    }
    if (sites.size !== 1) return null
    const [[id, name]] = [...sites]
    return { id, name }
  }

  /** One record, as a phrase with links: "detector SD-104 at Harbor Lantern Eastlake". */
  record(entity: string, id: number | null, withSite = true): Part[] {
    if (id === null) return [nounFor(entity, 1)]
    switch (entity) {
      case 'detector': {
        const d = this.names.detectors[id]
        if (!d) return [`detector #${id}`]
        return ['detector ', { text: d.tag, href: `/devices/${id}` }, ...(withSite ? [' at ', this.site(d.siteId, d.siteName)] : [])]
      }
      case 'unit': {
        const u = this.names.units[id]
        if (!u) return [`unit #${id}`]
        return ['unit ', { text: u.tag, href: `/units/${id}` }, ...(withSite ? [' at ', this.site(u.siteId, u.siteName)] : [])]
      }
      case 'visit': {
        const v = this.names.visits[id]
        if (!v) return [`visit #${id}`]
        return ['the ', { text: `${v.kind} visit on ${readableDay(v.scheduledOn)}`, href: `/visits/${id}` }, ...(withSite ? [' at ', this.site(v.siteId, v.siteName)] : [])]
      }
      case 'site':
        return ['site ', this.site(id)]
      case 'customer': {
        const c = this.names.customers[id]
        return c ? ['customer ', { text: c.name, href: `/customers/${id}` }] : [`customer #${id}`]
      }
      case 'user':
        return [this.person(id)]
      case 'api_token': {
        const t = this.names.tokens[id]
        return t ? ['API token ', quoted(t.name)] : [`API token #${id}`]
      }
      case 'saved_view': {
        const v = this.names.views[id]
        return v ? ['the saved view ', quoted(v.name)] : ['a saved view']
      }
      case 'attachment': {
        const a = this.names.attachments[id]
        return a ? [quoted(a.fileName)] : [`file #${id}`]
      }
      default:
        return [`${nounFor(entity, 1)} #${id}`]
    }
  }

  /** Several records of one kind: "3 detectors at Harbor Lantern Eastlake" or "5 detectors at 2 sites". */
  records(entity: string, ids: number[]): Part[] {
    if (ids.length === 1) return this.record(entity, ids[0])
    const common = this.commonSite(entity, ids)
    const head = plural(ids.length, nounFor(entity, 1), nounFor(entity, 2))
    if (common) return [head, ' at ', this.site(common.id, common.name)]
    if (entity === 'detector' || entity === 'unit' || entity === 'visit') {
      const table = entity === 'detector' ? this.names.detectors : entity === 'unit' ? this.names.units : this.names.visits
      const sites = new Set(ids.map((id) => table[id]?.siteId ?? 0))
      if (!sites.has(0)) return [head, ` at ${plural(sites.size, 'site')}`]
    }
    return [head]
  }
}

// ——— sentences ———

interface Ctx {
  rows: AuditRow[]
  head: AuditRow
  ids: number[]
  actor: Part
  before: Record<string, unknown>
  after: Record<string, unknown>
  n: Namer
  changes: Change[]
}

const text = (v: unknown) => (typeof v === 'string' && v.trim() ? v.trim() : null)
const role = (v: unknown) => (typeof v === 'string' && isRole(v) ? ROLE_LABELS[v] : String(v ?? '—'))
const dayOf = (v: unknown) => (typeof v === 'string' && /^\d{4}-\d{2}-\d{2}/.test(v) ? readableDay(v.slice(0, 10)) : null)

function fieldList(changes: Change[]): string {
  const labels = changes.map((c) => c.field.toLowerCase())
  if (labels.length === 0) return ''
  if (labels.length <= 3) return labels.length === 1 ? labels[0] : `${labels.slice(0, -1).join(', ')} and ${labels.at(-1)}`
  return `${labels.slice(0, 2).join(', ')} and ${labels.length - 2} more fields`
}

/** How many records a bulk entry touched: its count, else the length of its list. */
function bulkCount(row: AuditRow): number | null {
  const a = asRecord(row.after)
  for (const key of ['count', 'recordCount', 'records', 'total']) {
    const v = a?.[key]
    if (typeof v === 'number') return v
  }
  const listed = listedRecords(row.after)
  return listed.length || null
}

function bulkNoun(row: AuditRow, n: number): string {
  const entity = listedEntity(row)
  return entity && entity !== 'bulk_change' ? nounFor(entity, n) : n === 1 ? 'record' : 'records'
}

const countsOf = (value: Record<string, unknown>, skip: string[] = []) =>
  Object.entries(value)
    .filter(([k, v]) => typeof v === 'number' && v !== 0 && !skip.includes(k) && !k.endsWith('Id'))
    .map(([k, v]) => `${(v as number).toLocaleString('en-US')} ${fieldLabel(k).toLowerCase()}`)

const VISIT_RESULT_WORDS: Record<string, string> = { pass: 'passed', fail: 'failed', skipped: 'not tested', pending: 'pending' }

function resultTally(list: unknown): string | null {
  if (!Array.isArray(list) || list.length === 0) return null
  const counts = new Map<string, number>()
  for (const item of list) {
    const r = String(asRecord(item)?.result ?? '')
    counts.set(r, (counts.get(r) ?? 0) + 1)
  }
  return [...counts].map(([k, n]) => `${n} ${VISIT_RESULT_WORDS[k] ?? k}`).join(', ')
}

type Sentence = (c: Ctx) => Part[]

const onRecords = (c: Ctx) => c.n.records(c.head.entity, c.ids)
// Entries grouped into one line share their action, not their details: a tally, a technician or a
// date is told only when the line stands for one entry.
const one = (c: Ctx) => c.rows.length === 1

const SENTENCES: Record<string, Sentence> = {
  'user.invite': (c) => [c.actor, ' invited ', ...onRecords(c), ...(text(c.after.email) ? [` (${c.after.email})`] : []), ' as ', role(c.after.role)],
  'user.change-role': (c) => [c.actor, ' changed the role of ', ...onRecords(c), ' from ', role(c.before.role), ' to ', role(c.after.role)],
  'user.deactivate': (c) => [c.actor, ' deactivated ', ...onRecords(c), ' and ended their sessions and API tokens'],
  'user.reactivate': (c) => [c.actor, ' reactivated ', ...onRecords(c)],
  'user.update': (c) => [c.actor, ' changed ', ...onRecords(c), '’s ', fieldList(c.changes) || 'details'],
  'token.create': (c) => [c.actor, ' created ', ...onRecords(c), ' acting as ', c.n.person(numeric(c.after.userId)), ...(dayOf(c.after.expiresAt) ? [`, good until ${dayOf(c.after.expiresAt)}`] : [])],
  'token.revoke': (c) => [c.actor, ' revoked ', ...(text(c.before.name) ? ['API token ', quoted(String(c.before.name))] : onRecords(c))],
  'triage.acknowledge': (c) => [c.actor, ' acknowledged ', ...onRecords(c), ...(text(c.after.note) ? [` with the note ${quoted(String(c.after.note))}`] : [])],
  'triage.assign': (c) => [c.actor, ' assigned ', ...onRecords(c), ' to ', c.n.person(numeric(c.after.assignedTo))],
  'visit.book': (c) => {
    const n = one(c) && Array.isArray(c.after.detectors) ? c.after.detectors.length : null
    return [c.actor, ' booked ', ...onRecords(c), ...(n ? [` for ${plural(n, 'detector')}`] : []), ...(one(c) && numeric(c.after.technicianId) ? [' with ', c.n.person(numeric(c.after.technicianId))] : [])]
  },
  'visit.notify': (c) => [c.actor, ' logged the notice to the monitoring company for ', ...onRecords(c)],
  'visit.start': (c) => [c.actor, ' started ', ...onRecords(c)],
  'visit.record': (c) => {
    const tally = one(c) ? resultTally(c.after.recorded) : null
    return [c.actor, ' recorded work', ...(one(c) && Array.isArray(c.after.recorded) ? [` on ${plural(c.after.recorded.length, 'detector')}`] : []), ' for ', ...onRecords(c), ...(tally ? [` (${tally})`] : [])]
  },
  'visit.complete': (c) => {
    const tally = one(c) ? resultTally(c.after.detectors) : null
    return [c.actor, ' completed ', ...onRecords(c), ...(tally ? [`: ${tally}`] : [])]
  },
  'visit.all-clear': (c) => [c.actor, ' logged the all-clear for ', ...onRecords(c), ...(one(c) && text(c.after.clearedWith) ? [`, confirmed with ${c.after.clearedWith}`] : [])],
  'visit.email-notice': (c) => [c.actor, ' e-mailed the notice of work to the monitoring company for ', ...onRecords(c)],
  'visit.email-all-clear': (c) => [c.actor, ' e-mailed the all-clear to the monitoring company for ', ...onRecords(c)],
  'visit.retry-email': (c) => [c.actor, ' sent a failed e-mail to the monitoring company again for ', ...onRecords(c)],
  'outbox.retry': (c) => [c.actor, ' sent failed e-mail message ', String(c.ids[0] ?? ''), ' again'],
  'visit.cancel': (c) => [c.actor, ' cancelled ', ...onRecords(c), ...(text(c.after.reason) ? [`: ${quoted(String(c.after.reason))}`] : [])],
  'visit.reschedule': (c) => [c.actor, ' moved ', ...(one(c) ? c.n.record('visit', c.ids[0]) : onRecords(c)), ...(one(c) && dayOf(c.before.scheduledOn) && dayOf(c.after.scheduledOn) ? [` from ${dayOf(c.before.scheduledOn)} to ${dayOf(c.after.scheduledOn)}`] : [])],
  'visit.assign': (c) => (numeric(c.after.technicianId) ? [c.actor, ' assigned ', ...onRecords(c), ' to ', c.n.person(numeric(c.after.technicianId))] : [c.actor, ' took the technician off ', ...onRecords(c)]),
  'visit.edit': (c) => [c.actor, ' changed the ', fieldList(c.changes) || 'details', ' of ', ...onRecords(c)],
  'attachment.add': (c) => {
    const visit = numeric(c.after.visitId)
    const detector = numeric(c.after.detectorId)
    return [
      c.actor,
      ' added ',
      ...(text(c.after.fileName) ? [quoted(String(c.after.fileName))] : onRecords(c)),
      ...(detector ? [' for ', ...c.n.record('detector', detector, false)] : []),
      ...(visit ? [' to ', ...c.n.record('visit', visit)] : []),
    ]
  },
  'view.save': (c) => [c.actor, c.before.query ? ' updated the saved view ' : ' saved the view ', quoted(String(c.after.name ?? 'untitled')), ...(text(c.after.page) ? [` on the ${c.after.page === 'devices' ? 'detectors' : c.after.page} list`] : [])],
  'view.rename': (c) => [c.actor, ' renamed the saved view ', quoted(String(c.before.name ?? '')), ' to ', quoted(String(c.after.name ?? ''))],
  'view.delete': (c) => [c.actor, ' deleted the saved view ', quoted(String(c.before.name ?? 'untitled'))],
  'session.sign-in': (c) => [c.actor, ' signed in'],
  'session.sign-out': (c) => [c.actor, ' signed out'],
  'session.refused': (c) => {
    const why = c.after.reason === 'unknown' ? 'not set up in Ductkeeper' : c.after.reason === 'inactive' ? 'the account is deactivated' : 'the sign-in could not be completed (expired, replayed or tampered with)'
    return ['Sign-in refused', ...(text(c.after.email) ? [' for ', String(c.after.email)] : []), `: ${why}`]
  },
  'bulk.reschedule': (c) => {
    const n = bulkCount(c.head)
    const shift = typeof c.after.days === 'number' ? ` by ${plural(Math.abs(c.after.days), 'day')} ${c.after.days < 0 ? 'earlier' : 'later'}` : ''
    return [c.actor, ' rescheduled ', n === null ? 'visits' : plural(n, bulkNoun(c.head, 1), bulkNoun(c.head, 2)), shift, ...(text(c.after.summary) ? [`: ${quoted(String(c.after.summary))}`] : [])]
  },
  'bulk.undo': (c) => {
    const n = bulkCount(c.head)
    const summary = text(c.before.summary) ?? text(c.after.summary)
    return [c.actor, ' undid ', summary ? `the bulk change ${quoted(summary)}` : 'a bulk change', ...(n === null ? [] : [`, putting back ${plural(n, bulkNoun(c.head, 1), bulkNoun(c.head, 2))}`])]
  },
  'import.inventory': (c) => {
    const counts = countsOf(c.after, ['rows', 'errors'])
    const file = text(c.after.file) ?? text(c.after.fileName)
    return [c.actor, ' imported inventory', ...(file ? [` from ${quoted(file)}`] : []), ...(counts.length ? [`: ${counts.join(', ')}`] : [])]
  },
  'import.events': (c) => {
    const n = typeof c.after.eventsAdded === 'number' ? c.after.eventsAdded : bulkCount(c.head)
    const file = text(c.after.file) ?? text(c.after.fileName)
    const known = typeof c.after.alreadyPresent === 'number' && c.after.alreadyPresent > 0 ? ` (${plural(c.after.alreadyPresent, 'event')} already there)` : ''
    return [c.actor, ' imported ', n === null ? 'events' : plural(n, 'event'), ...(file ? [` from ${quoted(file)}`] : []), known]
  },
  'calendar.close': (c) => [c.actor, ' closed ', dayOf(c.head.entityId) ?? 'a day', ' on the company calendar', ...(text(c.after.label) ? [`: ${quoted(String(c.after.label))}`] : [])],
  'calendar.reopen': (c) => [c.actor, ' reopened ', dayOf(c.head.entityId) ?? 'a day', ' on the company calendar'],
}

// Bulk changes name what they did in their summary; the verb says it for the count of records.
const BULK_VERBS: Record<string, string> = {
  acknowledge: 'acknowledged',
  unacknowledge: 'took back the acknowledgement of',
  assign: 'assigned',
  'set-state': 'changed the state of',
  note: 'added a note to',
  'cleaning-cycle': 'planned cleaning for',
  'delay-audit': 'booked delay-setting corrections for',
}
for (const [name, verb] of Object.entries(BULK_VERBS)) {
  SENTENCES[`bulk.${name}`] = (c) => {
    const n = bulkCount(c.head)
    const summary = text(c.after.summary)
    return [c.actor, ` ${verb} `, n === null ? 'records' : plural(n, bulkNoun(c.head, 1), bulkNoun(c.head, 2)), ' in one change', ...(summary ? [`: ${quoted(summary)}`] : [])]
  }
}

const EDITS = ['customer', 'site', 'unit', 'detector']
for (const e of EDITS) SENTENCES[`${e}.update`] = (c) => [c.actor, ' changed the ', fieldList(c.changes) || 'details', ' of ', ...onRecords(c)]

const PAST: Record<string, string> = {
  create: 'created',
  add: 'added',
  update: 'changed',
  edit: 'changed',
  delete: 'deleted',
  remove: 'removed',
  undo: 'undid',
  cancel: 'cancelled',
  set: 'set',
  reset: 'reset',
  run: 'ran',
}

/** Any action nobody has taught the builder yet still reads as a sentence. */
const generic: Sentence = (c) => {
  const [area, verb = ''] = c.head.action.split('.')
  const did = PAST[verb] ?? `${verb.replace(/-/g, ' ')}${verb.endsWith('e') ? 'd' : 'ed'}`
  const n = c.ids.length ? c.ids.length : bulkCount(c.head)
  const what = c.ids.length && ENTITY_TABLE[c.head.entity] ? onRecords(c) : n ? [plural(n, bulkNoun(c.head, 1), bulkNoun(c.head, 2))] : [area.replace(/_/g, ' ')]
  const summary = text(c.after.summary)
  return [c.actor, ` ${did} `, ...what, ...(summary ? [`: ${quoted(summary)}`] : [])]
}

/** One item of the log: the sentence, the changed fields, and the records when there are several. */
export function describe(rows: AuditRow[], names: Named, o: SentenceOptions): AuditItem {
  const head = rows[0]
  const n = new Namer(names, o)
  const before = asRecord(head.before) ?? {}
  const after = asRecord(head.after) ?? {}
  const ids = isBulk(head) ? [] : rows.map((r) => numeric(r.entityId)).filter((x): x is number => x !== null)
  const bulk = isBulk(head) ? names.bulk[numeric(head.entityId) ?? 0] : undefined
  // A bulk entry's own before/after is bookkeeping (what changed is told record by record below); a
  // sign-in's is what the sentence already says.
  const changes = isBulk(head) || head.action.startsWith('session.') ? [] : changedFields(head.before, head.after, names, o.timeZone)
  const actor = head.actorId ? n.person(head.actorId) : 'Ductkeeper'
  const ctx: Ctx = { rows, head, ids, actor, before, after, n, changes }
  const parts = (SENTENCES[head.action] ?? generic)(ctx)
  if (bulk?.undoneAt && head.action !== 'bulk.undo') parts.push(' (since undone)')
  const listed = listedEntity(head)
  const records =
    rows.length > 1
      ? ids.map((id) => n.record(head.entity, id))
      : bulk
        ? bulk.records.slice(0, BULK_LISTED).map((r) => bulkRecordParts(r, names, o.timeZone, head.action === 'bulk.undo'))
        : listed && isBulk(head)
        ? listedRecords(head.after)
            .slice(0, 50)
            .map((r) => numeric(r.id))
            .filter((id): id is number => id !== null)
            .map((id) => n.record(listed, id))
        : []
  return { id: head.id, at: head.at, kind: kindOf(head.action), parts: tidy(parts), changes, records }
}

// A bulk change can touch thousands of records; the log lists the first ones and says how many in all.
const BULK_LISTED = 50
const RECORD_PAGES: Record<string, string> = { detector: '/devices', visit: '/visits', site: '/sites', unit: '/units', customer: '/customers' }

function bulkRecordParts(r: BulkRecord, names: Named, timeZone: string, undo: boolean): Part[] {
  const page = RECORD_PAGES[r.entity]
  const what = (undo ? changedFields(r.after, r.before, names, timeZone) : changedFields(r.before, r.after, names, timeZone))
    .map((c) => `${c.field.toLowerCase()} ${c.before} → ${c.after}`)
    .join('; ')
  return [{ text: r.label, href: page ? `${page}/${r.id}` : null }, ...(what ? [`: ${what}`] : [])]
}

/** Joins neighbouring text parts and drops empty ones, so the page renders few nodes. */
function tidy(parts: Part[]): Part[] {
  const out: Part[] = []
  for (const p of parts) {
    if (p === '') continue
    const last = out.at(-1)
    if (typeof p === 'string' && typeof last === 'string') out[out.length - 1] = last + p
    else out.push(p)
  }
  return out
}

/** The sentence as plain text (tests, titles). */
export const sentenceText = (parts: Part[]) => parts.map((p) => (typeof p === 'string' ? p : p.text)).join('')
