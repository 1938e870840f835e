import { z } from 'zod'
import { customerFields, detectorAddedFields, detectorFields, siteFields, unitFields } from './record-forms'
import {
  CODE_BASES,
  CUSTOMER_KINDS,
  DUCT_SHAPES,
  ENVIRONMENTS,
  EOL_PLACEMENTS,
  EVENT_KINDS,
  HOUSINGS,
  POSITIONS,
  SHUTDOWN_INPUTS,
  TERMINALS,
  UNIT_KINDS,
} from './vocabulary'

// What a CSV file can bring in, field by field: the mapping screen, the guesses from header names and
// the row checks all read these lists. Every cell arrives as text; the schemas turn it into values.

export const IMPORT_KINDS = ['inventory', 'events'] as const
export type ImportKind = (typeof IMPORT_KINDS)[number]

export interface ImportField {
  key: string
  label: string
  /** Other header names that mean this field (compared without case, spaces or punctuation). */
  aliases?: string[]
  /** Needed on every row; other fields are needed only when the row adds a new record. */
  always?: boolean
  hint?: string
}

const words = (values: readonly string[]) => values.join(', ')

export const INVENTORY_FIELDS: ImportField[] = [
  { key: 'customer', label: 'Customer', aliases: ['customer name', 'client', 'owner'], always: true },
  { key: 'customerKind', label: 'Customer kind', aliases: ['customer type', 'business type'], hint: words(CUSTOMER_KINDS) },
  { key: 'site', label: 'Site', aliases: ['site name', 'location name', 'store', 'building'], always: true },
  { key: 'street', label: 'Street', aliases: ['address', 'street address'] },
  { key: 'city', label: 'City', aliases: ['town'] },
  { key: 'region', label: 'Region', aliases: ['state', 'province', 'subdivision'], hint: 'ISO 3166-2, such as US-OR' },
  { key: 'postalCode', label: 'Postal code', aliases: ['zip', 'zip code', 'postcode'] },
  { key: 'timeZone', label: 'Time zone', aliases: ['tz', 'timezone'], hint: 'such as America/Chicago' },
  { key: 'jurisdiction', label: 'Jurisdiction' },
  { key: 'ahjName', label: 'AHJ', aliases: ['ahj name', 'authority having jurisdiction', 'fire marshal'] },
  { key: 'codeBasis', label: 'Code basis', hint: words(CODE_BASES) },
  { key: 'monitoring', label: 'Monitoring company', aliases: ['central station', 'monitoring'] },
  { key: 'monitoringAccount', label: 'Monitoring account', aliases: ['account', 'account number', 'monitoring account number'] },
  { key: 'unit', label: 'Unit tag', aliases: ['unit', 'rtu', 'ahu', 'equipment', 'equipment tag'], always: true },
  { key: 'unitKind', label: 'Unit kind', aliases: ['unit type', 'equipment type'], hint: words(UNIT_KINDS) },
  { key: 'shutdownInput', label: 'Shutdown input', hint: words(SHUTDOWN_INPUTS) },
  { key: 'supplyCfm', label: 'Supply CFM', aliases: ['supply airflow', 'cfm'] },
  { key: 'returnCfm', label: 'Return CFM', aliases: ['return airflow'] },
  { key: 'ductShape', label: 'Duct shape', hint: words(DUCT_SHAPES) },
  { key: 'tag', label: 'Detector tag', aliases: ['detector', 'device', 'device tag', 'detector id'], always: true },
  { key: 'serial', label: 'Serial', aliases: ['serial number', 'sn'] },
  { key: 'model', label: 'Model', aliases: ['detector model', 'make model'], hint: 'a model already listed' },
  { key: 'position', label: 'Position', aliases: ['supply return', 'duct'], hint: words(POSITIONS) },
  { key: 'housing', label: 'Housing', aliases: ['enclosure'], hint: words(HOUSINGS) },
  { key: 'environment', label: 'Environment', aliases: ['location type'], hint: words(ENVIRONMENTS) },
  { key: 'installedOn', label: 'Installed on', aliases: ['installed', 'install date', 'installation date'], hint: 'YYYY-MM-DD' },
  { key: 'eolOhms', label: 'EOL ohms', aliases: ['eol', 'eol resistor', 'end of line'] },
  { key: 'eolPlacement', label: 'EOL placement', hint: words(EOL_PLACEMENTS) },
  { key: 'alarmTerminal', label: 'Alarm terminal', hint: words(TERMINALS) },
  { key: 'supervisoryTerminal', label: 'Supervisory terminal', hint: words(TERMINALS) },
  { key: 'conductorAwg', label: 'Conductor AWG', aliases: ['awg', 'wire gauge'] },
  { key: 'conductorStranded', label: 'Stranded', aliases: ['conductor stranded'], hint: 'yes or no' },
  { key: 'runFeet', label: 'Run (ft)', aliases: ['run feet', 'run length', 'one way feet'] },
]

export const EVENT_FIELDS: ImportField[] = [
  { key: 'account', label: 'Monitoring account', aliases: ['account number', 'acct'], hint: 'or the site name' },
  { key: 'site', label: 'Site', aliases: ['site name', 'premises', 'location'], hint: 'or the monitoring account' },
  { key: 'customer', label: 'Customer', aliases: ['customer name', 'subscriber'], hint: 'when two customers have sites of one name' },
  { key: 'detector', label: 'Detector tag', aliases: ['detector tag', 'detectortag', 'zone', 'device', 'point'] },
  { key: 'occurredAt', label: 'Time', aliases: ['occurred at', 'date time', 'datetime', 'timestamp', 'event time'], always: true, hint: 'ISO 8601; without an offset, the site’s own time' },
  { key: 'kind', label: 'Kind', aliases: ['event type', 'type', 'signal', 'event'], always: true, hint: words(EVENT_KINDS) },
  { key: 'detail', label: 'Detail', aliases: ['description', 'comment', 'notes', 'text'] },
  { key: 'eventId', label: 'Event id', aliases: ['event number', 'signal id', 'reference'], hint: 'the file’s own id, if it has one' },
]

export const FIELDS_OF: Record<ImportKind, ImportField[]> = { inventory: INVENTORY_FIELDS, events: EVENT_FIELDS }

/** Header text reduced to letters and digits, for comparing names. */
export const headerKey = (text: string) => text.toLowerCase().replace(/[^\p{L}\p{N}]+/gu, '')

/** Field → the file's column (by header text) or null: the guess made from the header names. */
export function guessMapping(kind: ImportKind, headers: string[]): Record<string, string | null> {
  const taken = new Set<string>()
  const mapping: Record<string, string | null> = {}
  for (const field of FIELDS_OF[kind]) {
    const names = [field.key, field.label, ...(field.aliases ?? [])].map(headerKey)
    // Exact names first, in the order the field lists them, so 'site' is not taken by 'site name'.
    const hit = names.map((n) => headers.find((h) => !taken.has(h) && headerKey(h) === n)).find((h) => h !== undefined)
    mapping[field.key] = hit ?? null
    if (hit) taken.add(hit)
  }
  return mapping
}

/** The mapping a request sends: each field names one of the file's columns, or none. */
export const mappingSchema = z.record(z.string().max(60), z.string().max(200).nullable())
export type Mapping = z.infer<typeof mappingSchema>

// ---- cell readers: text in, value out ----

const blankToUndefined = (v: unknown) => (typeof v === 'string' && v.trim() === '' ? undefined : typeof v === 'string' ? v.trim() : v)

const text = (max: number) => z.preprocess(blankToUndefined, z.string().max(max, `At most ${max} characters`).optional())

/** A cell the import cannot hand to the field's rule at all (a word it does not know), with why. */
class Unreadable {
  constructor(readonly message: string) {}
}

/**
 * One inventory cell, checked by the record form's own rule for that field: a blank cell is "not
 * given" (undefined), so a found record keeps its value; `read` turns spreadsheet text into what the
 * rule takes; `also` follows the rule's message (a file has no drop-down to show the choices).
 * `needed` names a field every row must give.
 */
function cell<T extends z.ZodType>(rule: T, o: { read?: (text: string) => unknown; also?: string; needed?: string } = {}) {
  // Optional on the way out too: a column left unmapped is absent from the row, not an error.
  return z.unknown().transform((v, ctx): z.output<T> | undefined => {
    const given = blankToUndefined(v)
    if (given === undefined || given === null) {
      if (o.needed) ctx.addIssue({ code: 'custom', message: `${o.needed} is needed on every row` })
      return o.needed ? z.NEVER : undefined
    }
    const value = o.read && typeof given === 'string' ? o.read(given) : given
    if (value instanceof Unreadable) {
      ctx.addIssue({ code: 'custom', message: value.message })
      return z.NEVER
    }
    const checked = rule.safeParse(value)
    if (checked.success) return checked.data
    ctx.addIssue({ code: 'custom', message: `${checked.error.issues[0]?.message ?? 'Not a valid value'}${o.also ?? ''}` })
    return z.NEVER
  }).optional()
}

/** One of the rule's words, matched without regard to case, spaces or underscores. */
function choiceCell<T extends z.ZodEnum>(rule: T) {
  const values = rule.options as string[]
  return cell(rule, {
    read: (t) => {
      const key = t.toLowerCase().replace(/[\s_]+/g, '-')
      return values.find((x) => x.toLowerCase() === key) ?? t
    },
    also: `: one of ${values.join(', ')}`,
  })
}

// Spreadsheets write a yes/no column in many ways; a word not among them is refused, not read as no.
const YES = ['yes', 'y', 'true', '1', 'stranded']
const NO = ['no', 'n', 'false', '0', 'solid']
const yesNo = (t: string) => {
  const l = t.toLowerCase()
  return YES.includes(l) ? true : NO.includes(l) ? false : new Unreadable('Use yes or no')
}

// Every field's rule is the record form's (`record-forms.ts`); the import adds only how a cell is read.
// `model` and `monitoring` are names, looked up among the records already listed.
export const inventoryRow = z.object({
  customer: cell(customerFields.name, { needed: 'The customer' }),
  customerKind: choiceCell(customerFields.kind),
  site: cell(siteFields.name, { needed: 'The site' }),
  street: cell(siteFields.street),
  city: cell(siteFields.city),
  region: cell(siteFields.region),
  postalCode: cell(siteFields.postalCode),
  timeZone: cell(siteFields.timeZone),
  jurisdiction: cell(siteFields.jurisdiction),
  ahjName: cell(siteFields.ahjName),
  codeBasis: choiceCell(siteFields.codeBasis),
  monitoring: text(120),
  monitoringAccount: cell(siteFields.monitoringAccount),
  unit: cell(unitFields.tag, { needed: 'The unit tag' }),
  unitKind: choiceCell(unitFields.kind),
  shutdownInput: choiceCell(unitFields.shutdownInput),
  supplyCfm: cell(unitFields.supplyCfm),
  returnCfm: cell(unitFields.returnCfm),
  ductShape: choiceCell(unitFields.ductShape),
  tag: cell(detectorFields.tag, { needed: 'The detector tag' }),
  serial: cell(detectorFields.serial),
  model: text(120),
  position: choiceCell(detectorFields.position),
  housing: choiceCell(detectorFields.housing),
  environment: choiceCell(detectorFields.environment),
  installedOn: cell(detectorAddedFields.installedOn),
  eolOhms: cell(detectorFields.eolOhms),
  eolPlacement: choiceCell(detectorFields.eolPlacement),
  alarmTerminal: choiceCell(detectorFields.alarmTerminal),
  supervisoryTerminal: choiceCell(detectorFields.supervisoryTerminal),
  conductorAwg: cell(detectorFields.conductorAwg),
  conductorStranded: cell(detectorFields.conductorStranded, { read: yesNo }),
  runFeet: cell(detectorFields.runFeet),
})
export type InventoryRow = z.infer<typeof inventoryRow>

/** The fields each new record must bring (an existing one may leave them blank). */
export const NEEDED_FOR_NEW = {
  customer: ['customerKind'],
  site: ['street', 'city', 'region', 'postalCode', 'timeZone', 'jurisdiction', 'ahjName', 'codeBasis'],
  unit: ['unitKind', 'shutdownInput', 'supplyCfm', 'returnCfm', 'ductShape'],
  detector: ['model', 'position', 'housing', 'environment', 'installedOn', 'eolOhms', 'eolPlacement', 'alarmTerminal', 'supervisoryTerminal', 'conductorAwg', 'conductorStranded', 'runFeet'],
} as const satisfies Record<string, ReadonlyArray<keyof InventoryRow>>

// ---- event rows: no record form of their own ----

/** One of a fixed list, matched without regard to case, spaces or underscores. */
function choice<T extends readonly [string, ...string[]]>(values: T) {
  return z.preprocess(
    (v) => {
      const t = blankToUndefined(v)
      if (typeof t !== 'string') return t
      const key = t.toLowerCase().replace(/[\s_]+/g, '-')
      return values.find((x) => x.toLowerCase() === key) ?? t
    },
    z.enum(values, { error: `Use one of: ${values.join(', ')}` }).optional(),
  )
}

const required = <T extends z.ZodType>(schema: T, name: string) => schema.refine((v) => v !== undefined, `${name} is needed on every row`)

// An instant with its offset (or Z), or a local date and time read in the site's own time zone.
const WITH_OFFSET = /^\d{4}-\d{2}-\d{2}[T ]\d{2}:\d{2}(:\d{2}(\.\d{1,3})?)?(Z|[+-]\d{2}:?\d{2})$/i
const LOCAL = /^(\d{4})-(\d{2})-(\d{2})[T ](\d{2}):(\d{2})(?::(\d{2}))?$/

export const eventRow = z
  .object({
    account: text(60),
    site: text(120),
    customer: text(120),
    detector: text(60),
    occurredAt: z.preprocess(
      blankToUndefined,
      z
        .string({ error: 'The time is needed on every row' })
        .refine((v) => (WITH_OFFSET.test(v) && !Number.isNaN(Date.parse(v.replace(' ', 'T')))) || LOCAL.test(v), 'Use YYYY-MM-DD HH:MM, or ISO 8601 with an offset'),
    ),
    kind: required(choice(EVENT_KINDS), 'The kind'),
    detail: text(500),
    eventId: text(100),
  })
  .refine((r) => r.account !== undefined || r.site !== undefined, { path: ['site'], message: 'Give the monitoring account or the site name' })
export type EventRow = z.infer<typeof eventRow>

/** The offset of `timeZone` from UTC at the instant `ms`, in ms. */
function offsetAt(timeZone: string, ms: number): number {
  const parts = Object.fromEntries(
    new Intl.DateTimeFormat('en-US', { timeZone, hourCycle: 'h23', year: 'numeric', month: '2-digit', day: '2-digit', hour: '2-digit', minute: '2-digit', second: '2-digit' })
      .formatToParts(new Date(ms))
      .map((p) => [p.type, p.value]),
  )
  const asUtc = Date.UTC(+parts.year, +parts.month - 1, +parts.day, +parts.hour, +parts.minute, +parts.second)
  return asUtc - Math.floor(ms / 1000) * 1000
}

/** The stored instant (`toISOString()` text) for an event time: local times are read in the site's zone. */
export function eventInstant(value: string, timeZone: string): string {
  const local = LOCAL.exec(value)
  if (!local) return new Date(value.replace(' ', 'T')).toISOString()
  const [, y, mo, d, h, mi, s] = local
  const wall = Date.UTC(+y, +mo - 1, +d, +h, +mi, +(s ?? 0))
  // Two passes settle the offset across a daylight-saving change.
  let ms = wall - offsetAt(timeZone, wall)
  ms = wall - offsetAt(timeZone, ms)
  return new Date(ms).toISOString()
}
