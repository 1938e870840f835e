// Before/after values of an audit entry as a field table a person can read: labels instead of keys,
// names instead of ids, days and times instead of ISO text. Pure: the caller passes the names.
import { ROLE_LABELS, isRole } from './permissions'

export interface Named {
  users: Record<number, { name: string; email: string }>
  detectors: Record<number, { tag: string; siteId: number; siteName: string }>
  sites: Record<number, { name: string }>
  visits: Record<number, { scheduledOn: string; kind: string; siteId: number; siteName: string }>
  units: Record<number, { tag: string; siteId: number; siteName: string }>
  customers: Record<number, { name: string }>
  tokens: Record<number, { name: string; prefix: string }>
  views: Record<number, { name: string; page: string }>
  attachments: Record<number, { fileName: string; visitId: number | null }>
  /** Bulk changes by id: each record's label and fields before and after, and whether it was undone. */
  bulk: Record<number, { records: BulkRecord[]; undoneAt: string | null }>
}

export interface BulkRecord {
  entity: string
  id: number
  label: string
  before: unknown
  after: unknown
}

export const emptyNamed = (): Named => ({ users: {}, detectors: {}, sites: {}, visits: {}, units: {}, customers: {}, tokens: {}, views: {}, attachments: {}, bulk: {} })

export interface Change {
  field: string
  before: string
  after: string
}

const LABELS: Record<string, string> = {
  acknowledgedAt: 'Acknowledged',
  acknowledgedBy: 'Acknowledged by',
  active: 'Active',
  assignedTo: 'Assigned to',
  capacityUnit: 'Capacity counted in',
  clearedAt: 'All-clear at',
  clearedWith: 'Confirmed with',
  completedAt: 'Completed',
  contactEmail: 'Contact e-mail',
  contactName: 'Contact',
  contactPhone: 'Contact phone',
  contentType: 'File type',
  count: 'Records',
  dailyCapacity: 'Daily capacity',
  detectorId: 'Detector',
  detectors: 'Detectors',
  email: 'E-mail',
  expiresAt: 'Expires',
  fileName: 'File',
  kind: 'Kind',
  name: 'Name',
  note: 'Note',
  notes: 'Notes',
  page: 'List',
  prefix: 'Token starts',
  query: 'Filters',
  reason: 'Reason',
  recorded: 'Recorded',
  regions: 'Regions',
  revoked: 'Revoked',
  revokedAt: 'Revoked',
  role: 'Role',
  scheduledOn: 'Date',
  siteId: 'Site',
  sizeBytes: 'Size',
  startedAt: 'Started',
  status: 'Status',
  summary: 'Summary',
  tag: 'Tag',
  technicianId: 'Technician',
  unitId: 'Unit',
  userId: 'Person',
  visitId: 'Visit',
  window: 'Time window',
}

// Internal bookkeeping nobody reads: ids already named in the sentence, record versions.
const HIDDEN = new Set(['noticeId', 'version', 'id', 'records', 'changeId'])
const USER_KEYS = new Set(['userId', 'technicianId', 'assignedTo', 'acknowledgedBy', 'actorId', 'undoneBy', 'createdBy'])

/** 'contactPhone' → 'Contact phone', for keys the table has no label for. */
export function fieldLabel(key: string): string {
  const known = LABELS[key]
  if (known) return known
  const words = key
    .replace(/([a-z0-9])([A-Z])/g, '$1 $2')
    .replace(/[_-]+/g, ' ')
    .trim()
    .toLowerCase()
  return words.charAt(0).toUpperCase() + words.slice(1)
}

const DAY = /^\d{4}-\d{2}-\d{2}$/
const INSTANT = /^\d{4}-\d{2}-\d{2}T\d{2}:\d{2}/

// Building an Intl formatter costs far more than using one, and a page of entries formats hundreds of
// values: each formatter is made once.
const dayFormat = new Intl.DateTimeFormat('en-GB', { weekday: 'short', day: 'numeric', month: 'short', year: 'numeric', timeZone: 'UTC' })
const instantFormats = new Map<string, Intl.DateTimeFormat>()

/** A calendar day written as everywhere else in the console (the same words as `formatDay`). */
export const readableDay = (iso: string) => dayFormat.format(new Date(`${iso}T00:00:00Z`))

/** An instant as the office reads it: '1 Dec 2026, 14:03'. */
export function readableInstant(iso: string, timeZone: string): string {
  const d = new Date(iso)
  if (Number.isNaN(d.getTime())) return iso
  let f = instantFormats.get(timeZone)
  if (!f) {
    f = new Intl.DateTimeFormat('en-GB', { day: 'numeric', month: 'short', year: 'numeric', hour: '2-digit', minute: '2-digit', hourCycle: 'h23', timeZone })
    instantFormats.set(timeZone, f)
  }
  return f.format(d)
}

function bytes(n: number): string {
  if (n < 1024) return `${n} B`
  if (n < 1024 * 1024) return `${(n / 1024).toFixed(0)} KB`
  return `${(n / 1024 / 1024).toFixed(1)} MB`
}

const plural = (n: number, one: string, many = `${one}s`) => `${n.toLocaleString('en-US')} ${n === 1 ? one : many}`

function tally(list: unknown[], key: string): string {
  const counts = new Map<string, number>()
  for (const item of list) {
    const v = (item as Record<string, unknown>)[key]
    counts.set(String(v), (counts.get(String(v)) ?? 0) + 1)
  }
  return [...counts].map(([k, n]) => `${n} ${k}`).join(', ')
}

/** One before/after value in words; `key` says what it is (a person, a site, a day …). */
export function readableValue(key: string, value: unknown, names: Named, timeZone: string): string {
  if (value === null || value === undefined || value === '') return '—'
  if (typeof value === 'boolean') return value ? 'Yes' : 'No'
  if (typeof value === 'number') {
    if (USER_KEYS.has(key)) return names.users[value]?.name ?? `person #${value}`
    if (key === 'siteId') return names.sites[value]?.name ?? `site #${value}`
    if (key === 'detectorId') return names.detectors[value]?.tag ?? `detector #${value}`
    if (key === 'visitId') {
      const v = names.visits[value]
      return v ? `${readableDay(v.scheduledOn)} at ${v.siteName}` : `visit #${value}`
    }
    if (key === 'sizeBytes') return bytes(value)
    return value.toLocaleString('en-US')
  }
  if (typeof value === 'string') {
    if (key === 'role' && isRole(value)) return ROLE_LABELS[value]
    if (key === 'prefix') return `dk_${value}_…`
    if (key === 'regions') return value.split(',').join(', ')
    if (key === 'capacityUnit') return value === 'visits' ? 'visits a day' : 'detectors a day'
    if (DAY.test(value)) return readableDay(value)
    if (INSTANT.test(value)) return readableInstant(value, timeZone)
    return value
  }
  if (Array.isArray(value)) {
    if (key === 'window') return value.every((v) => v == null) ? 'any time' : `${value[0] ?? '…'}–${value[1] ?? '…'}`
    if (value.length === 0) return 'none'
    if (value.every((v) => typeof v !== 'object' || v === null)) return value.map((v) => readableValue(key, v, names, timeZone)).join(', ')
    const first = value[0] as Record<string, unknown>
    const noun = key === 'detectors' || key === 'recorded' || 'detectorId' in first ? 'detector' : 'record'
    const results = 'result' in first ? ` (${tally(value, 'result')})` : ''
    return `${plural(value.length, noun)}${results}`
  }
  if (typeof value === 'object') {
    return Object.entries(value as Record<string, unknown>)
      .filter(([k]) => !HIDDEN.has(k))
      .map(([k, v]) => `${fieldLabel(k)}: ${readableValue(k, v, names, timeZone)}`)
      .join('; ')
  }
  return String(value)
}

const asRecord = (v: unknown): Record<string, unknown> | null => (v && typeof v === 'object' && !Array.isArray(v) ? (v as Record<string, unknown>) : null)

/**
 * The fields an entry changed, each with its value before and after; a field whose value did not
 * change is left out, and so is bookkeeping the sentence already says.
 */
export function changedFields(before: unknown, after: unknown, names: Named, timeZone: string): Change[] {
  const b = asRecord(before)
  const a = asRecord(after)
  if (!b && !a) {
    if (before == null && after == null) return []
    return [{ field: 'Value', before: readableValue('value', before, names, timeZone), after: readableValue('value', after, names, timeZone) }]
  }
  const keys = [...new Set([...Object.keys(b ?? {}), ...Object.keys(a ?? {})])].filter((k) => !HIDDEN.has(k))
  const out: Change[] = []
  for (const k of keys) {
    const was = b?.[k]
    const now = a?.[k]
    if (JSON.stringify(was ?? null) === JSON.stringify(now ?? null)) continue
    out.push({ field: fieldLabel(k), before: readableValue(k, was, names, timeZone), after: readableValue(k, now, names, timeZone) })
  }
  return out
}

/** The instant a calendar day begins in a time zone, as UTC ISO text (for filtering by the office's day). */
export function dayStartUtc(day: string, timeZone: string): string {
  const guess = Date.parse(`${day}T00:00:00Z`)
  const offset = (at: number) => {
    const p = Object.fromEntries(
      new Intl.DateTimeFormat('en-US', { timeZone, hourCycle: 'h23', year: 'numeric', month: '2-digit', day: '2-digit', hour: '2-digit', minute: '2-digit', second: '2-digit' })
        .formatToParts(new Date(at))
        .map((x) => [x.type, x.value]),
    )
    return Date.UTC(Number(p.year), Number(p.month) - 1, Number(p.day), Number(p.hour), Number(p.minute), Number(p.second)) - at
  }
  // Twice: the offset at the guess can differ from the offset at the answer across a clock change.
  const first = guess - offset(guess)
  return new Date(guess - offset(first)).toISOString()
}
