// The office's record forms: one schema per record, read by the edit pages in the browser and by the
// server (page actions and the JSON API) alike. Values arrive as form strings or as JSON, so every
// field takes either; a blank optional field is null. Each record's field rules are exported on their
// own (`customerFields`, ...) so the CSV import checks its cells by the very same rules.
import { z } from 'zod'
import { AWG_SIZES } from './conductors'
import { dateProblem } from './dates'
import { delayLimitCaution } from './delay-audit'
import { class2LimitVa, class2Source, CONTROL_VOLTS } from './power'
import {
  CODE_BASES,
  CUSTOMER_KINDS,
  DUCT_SHAPES,
  ENVIRONMENTS,
  EOL_PLACEMENTS,
  HOUSINGS,
  POSITIONS,
  SHUTDOWN_INPUTS,
  TERMINALS,
  TEST_STATIONS,
  UNIT_KINDS,
} from './vocabulary'

// The NFPA 72 limit on reporting a trouble, and its caution, live in one place: delay-audit.ts.

// The longest delay the forms take: module switches offer minutes, not hours (common practice).
const MAX_DELAY_SECONDS = 3600

const isBlank = (v: unknown) => v === undefined || v === null || (typeof v === 'string' && v.trim() === '')

const text = (what: string, max = 120) =>
  z
    .string({ error: `Enter the ${what}` })
    .trim()
    .min(1, `Enter the ${what}`)
    .max(max, `Keep it to ${max} characters`)

const optionalText = (max = 120) =>
  z.preprocess((v) => (isBlank(v) ? null : v), z.string().trim().max(max, `Keep it to ${max} characters`).nullable())

// Digits typed with thousands separators ("2,400") are read as the number.
const toNumber = (v: unknown) => (typeof v === 'string' ? Number(v.trim().replace(/,/g, '')) : v)

function number(o: { min: number; max: number; unit: string; whole?: boolean }) {
  const base = z.number({ error: (issue) => (issue.input === undefined ? 'Enter a number' : 'Enter a number, in plain digits') })
  const sized = (o.whole === false ? base : base.int('Use a whole number'))
    .min(o.min, `At least ${o.min.toLocaleString('en-US')} ${o.unit}`.trim())
    .max(o.max, `At most ${o.max.toLocaleString('en-US')} ${o.unit}`.trim())
  return sized
}

const required = (o: Parameters<typeof number>[0]) => z.preprocess((v) => (isBlank(v) ? undefined : toNumber(v)), number(o))
const optional = (o: Parameters<typeof number>[0]) => z.preprocess((v) => (isBlank(v) ? null : toNumber(v)), number(o).nullable())

// A checkbox posts "on" (or the hidden "false" before it); JSON sends a boolean.
const flag = z.preprocess((v) => v === true || v === 'on' || v === 'true', z.boolean())

const choice = <T extends readonly [string, ...string[]]>(values: T, what: string) => z.enum(values, { error: `Choose the ${what}` })

const recordId = (what: string) =>
  z.preprocess((v) => (isBlank(v) ? undefined : toNumber(v)), z.number({ error: `Choose the ${what}` }).int().positive(`Choose the ${what}`))

const optionalDay = z.preprocess(
  (v) => (isBlank(v) ? null : v),
  z
    .string()
    .nullable()
    .superRefine((v, ctx) => {
      const problem = v === null ? null : dateProblem(v)
      if (problem) ctx.addIssue({ code: 'custom', message: problem })
    }),
)

/** The version the editor read; a save on an older one is refused. */
export const versionOf = z.object({
  version: z.preprocess(toNumber, z.number({ error: 'Send the version you read' }).int().positive('Send the version you read')),
})

const email = z.preprocess((v) => (isBlank(v) ? null : v), z.string().trim().toLowerCase().email('Enter a valid e-mail address, or leave it blank').max(200).nullable())
const phone = z.preprocess(
  (v) => (isBlank(v) ? null : v),
  z
    .string()
    .trim()
    .regex(/^[+()\d][\d\s().+-]{5,29}$/, 'Enter a telephone number: digits, spaces, + ( ) and - only')
    .nullable(),
)

// --- Customer ---

export const customerFields = {
  name: text('customer’s name'),
  kind: choice(CUSTOMER_KINDS, 'kind of customer'),
  contactName: optionalText(),
  contactEmail: email,
  contactPhone: phone,
}
export const customerForm = z.object(customerFields)
export type CustomerForm = z.infer<typeof customerForm>

// --- Site ---

/** ISO 3166-2: country, hyphen, subdivision ('US-OR', 'CA-ON'). */
const REGION = /^[A-Z]{2}-[A-Z0-9]{1,3}$/

/** A time zone name the runtime's tz database knows ('America/Chicago'); offsets and abbreviations are refused. */
export function isTimeZone(name: string): boolean {
  if (!/^[A-Za-z][A-Za-z0-9_+-]*(\/[A-Za-z0-9_+-]+)*$/.test(name)) return false
  try {
    new Intl.DateTimeFormat('en-US', { timeZone: name })
    return true
  } catch {
    return false
  }
}

export const siteFields = {
  name: text('site’s name'),
  street: text('street address', 200),
  city: text('town or city'),
  region: z.preprocess(
    (v) => (typeof v === 'string' ? v.trim().toUpperCase() : v),
    z.string({ error: 'Enter the region' }).regex(REGION, 'Enter the ISO 3166-2 code, such as US-OR or CA-ON'),
  ),
  postalCode: text('postal code', 12),
  timeZone: z
    .string({ error: 'Enter the time zone' })
    .trim()
    .refine(isTimeZone, 'Enter a time zone name such as America/Chicago'),
  jurisdiction: text('jurisdiction'),
  ahjName: text('authority having jurisdiction (AHJ)'),
  ahjContact: optionalText(200),
  codeBasis: choice(CODE_BASES, 'code basis'),
  monitoringCompanyId: z.preprocess((v) => (isBlank(v) ? null : toNumber(v)), z.number().int().positive().nullable()),
  monitoringAccount: optionalText(40),
  delayPolicySeconds: required({ min: 0, max: MAX_DELAY_SECONDS, unit: 's' }),
  // A log of nuisance alarms: the condition of the 5-year sensitivity interval (NFPA 72 14.4.5.3.2).
  keepsNuisanceRecords: flag,
  accessNotes: optionalText(1000),
}

export const siteForm = z
  .object(siteFields)
  .superRefine((s, ctx) => {
    if (s.monitoringAccount && s.monitoringCompanyId === null) {
      ctx.addIssue({ code: 'custom', path: ['monitoringCompanyId'], message: 'Choose the monitoring company that holds this account' })
    }
  })
export type SiteForm = z.infer<typeof siteForm>

// --- Unit ---

// Duct sizes in inches: a few inches to a plenum of 20 ft (common practice, not a source).
const ductInches = { min: 4, max: 240, unit: 'in', whole: false }

export const unitFields = {
  tag: text('unit tag', 40),
  kind: choice(UNIT_KINDS, 'kind of unit'),
  location: optionalText(200),
  shutdownInput: choice(SHUTDOWN_INPUTS, 'shutdown input'),
  supplyCfm: required({ min: 0, max: 200_000, unit: 'cfm' }),
  returnCfm: required({ min: 0, max: 200_000, unit: 'cfm' }),
  ductShape: choice(DUCT_SHAPES, 'duct shape'),
  ductWidthIn: optional(ductInches),
  ductHeightIn: optional(ductInches),
  ductDiameterIn: optional(ductInches),
  storeysServed: required({ min: 1, max: 200, unit: 'storeys' }),
  // Detectors at each storey's return before the common return or riser; blank when not recorded.
  storeyReturnDetectors: optional({ min: 0, max: 200, unit: 'detectors' }),
  sharedPlenum: flag,
  areaDetection: flag,
  transformerVa: required({ min: 10, max: 1000, unit: 'VA' }),
}

export const unitForm = z
  .object(unitFields)
  .superRefine((u, ctx) => {
    const need = (field: 'ductWidthIn' | 'ductHeightIn' | 'ductDiameterIn', message: string) => {
      if (u[field] === null) ctx.addIssue({ code: 'custom', path: [field], message })
    }
    if (u.ductShape === 'round') need('ductDiameterIn', 'A round duct needs its diameter')
    else {
      need('ductWidthIn', 'A rectangular duct needs its width')
      need('ductHeightIn', 'A rectangular duct needs its height')
    }
  })
  // Only the shape's own sizes are kept, so a duct never carries both.
  .transform((u) =>
    u.ductShape === 'round' ? { ...u, ductWidthIn: null, ductHeightIn: null } : { ...u, ductDiameterIn: null },
  )
export type UnitForm = z.infer<typeof unitForm>

// --- Detector ---

const velocity = { min: 0, max: 10_000, unit: 'ft/min' }
const pressure = { min: 0, max: 10, unit: 'in. w.c.', whole: false }

export const detectorFields = {
  tag: text('detector tag', 40),
  serial: optionalText(60),
  modelId: recordId('model'),
  position: choice(POSITIONS, 'position in the duct'),
  headsFitted: required({ min: 1, max: 2, unit: 'heads' }),
  housing: choice(HOUSINGS, 'housing'),
  environment: choice(ENVIRONMENTS, 'environment'),
  delaySeconds: optional({ min: 0, max: MAX_DELAY_SECONDS, unit: 's' }),
  delayObservedOn: optionalDay,
  eolOhms: required({ min: 100, max: 100_000, unit: 'Ω' }),
  // Resistor tolerances are marked from 0.1 % to 20 % (common practice); blank means the usual 5 %.
  eolTolerancePct: optional({ min: 0.1, max: 20, unit: '%', whole: false }),
  // The panel input's alarm threshold from its documentation; blank means the common-practice 100 Ω.
  alarmThresholdOhms: optional({ min: 1, max: 10_000, unit: 'Ω' }),
  eolPlacement: choice(EOL_PLACEMENTS, 'EOL resistor placement'),
  alarmTerminal: choice(TERMINALS, 'alarm contact terminal'),
  supervisoryTerminal: choice(TERMINALS, 'supervisory contact terminal'),
  conductorAwg: z.preprocess(
    (v) => (isBlank(v) ? undefined : toNumber(v)),
    z.number({ error: 'Choose the conductor size' }).refine((n) => (AWG_SIZES as number[]).includes(n), `Choose ${AWG_SIZES.join(', ')} AWG`),
  ),
  conductorStranded: flag,
  runFeet: required({ min: 1, max: 10_000, unit: 'ft' }),
  testStation: choice(TEST_STATIONS, 'test station'),
  testStationFeet: optional({ min: 1, max: 2_000, unit: 'ft' }),
  velocityMinFpm: required(velocity),
  velocityMaxFpm: required(velocity),
  pressureMinInWc: required(pressure),
  pressureMaxInWc: required(pressure),
  cleaningIntervalDays: optional({ min: 7, max: 1_825, unit: 'days' }),
}

/**
 * Given once, when a detector is added (by an import); the edit form leaves it as recorded, since the
 * schedule of a first test counts from it.
 */
export const detectorAddedFields = {
  installedOn: z.preprocess(
    (v) => (isBlank(v) ? undefined : v),
    z.string({ error: 'Enter the day it was installed' }).superRefine((v, ctx) => {
      const problem = dateProblem(v)
      if (problem) ctx.addIssue({ code: 'custom', message: problem })
    }),
  ),
}

export const detectorForm = z
  .object(detectorFields)
  .superRefine((d, ctx) => {
    const issue = (field: string, message: string) => ctx.addIssue({ code: 'custom', path: [field], message })
    if (d.velocityMinFpm > d.velocityMaxFpm) issue('velocityMaxFpm', 'The highest velocity must be at least the lowest')
    if (d.pressureMinInWc > d.pressureMaxInWc) issue('pressureMaxInWc', 'The highest pressure must be at least the lowest')
    if (d.delayObservedOn !== null && d.delaySeconds === null) issue('delaySeconds', 'Enter the delay that was observed on that day')
  })
export type DetectorForm = z.infer<typeof detectorForm>

// --- Detector model: the listed ranges ---

const sensitivity = optional({ min: 0.1, max: 10, unit: '%/ft', whole: false })

export const modelForm = z
  .object({
    velocityMinFpm: required(velocity),
    velocityMaxFpm: required(velocity),
    pressureMinInWc: required(pressure),
    pressureMaxInWc: required(pressure),
    sensitivityLowPctFt: sensitivity,
    sensitivityHighPctFt: sensitivity,
  })
  .superRefine((m, ctx) => {
    const issue = (field: string, message: string) => ctx.addIssue({ code: 'custom', path: [field], message })
    if (m.velocityMinFpm > m.velocityMaxFpm) issue('velocityMaxFpm', 'The highest velocity must be at least the lowest')
    if (m.pressureMinInWc > m.pressureMaxInWc) issue('pressureMaxInWc', 'The highest pressure must be at least the lowest')
    const [low, high] = [m.sensitivityLowPctFt, m.sensitivityHighPctFt]
    if ((low === null) !== (high === null)) issue(low === null ? 'sensitivityLowPctFt' : 'sensitivityHighPctFt', 'Enter both ends of the listed range, or neither')
    else if (low !== null && high !== null && low >= high) issue('sensitivityHighPctFt', 'The high end must be above the low end')
  })
export type ModelForm = z.infer<typeof modelForm>

// --- Cautions: allowed, but worth a second look ---

export interface Caution {
  field: string
  message: string
}

// Cautions read the form as typed as well as the checked record, so the page can show them live.
const asNumber = (v: unknown): number | null => {
  const n = isBlank(v) ? NaN : Number(toNumber(v))
  return Number.isFinite(n) ? n : null
}

export function siteCautions(s: { delayPolicySeconds?: unknown }): Caution[] {
  const message = delayLimitCaution({ policySeconds: asNumber(s.delayPolicySeconds) })
  return message ? [{ field: 'delayPolicySeconds', message }] : []
}

export function unitCautions(u: { transformerVa?: unknown }): Caution[] {
  const va = asNumber(u.transformerVa)
  // A unit's control transformer is 24 VAC here: its Class 2 limit is read from the table by voltage.
  const limit = class2LimitVa(CONTROL_VOLTS)
  return va !== null && limit !== null && va > limit
    ? [{ field: 'transformerVa', message: `Over the ${limit} VA Class 2 limit for a ${CONTROL_VOLTS} V control circuit (${class2Source(CONTROL_VOLTS)}): have the circuit checked under licensed practice.` }]
    : []
}

export function detectorCautions(d: { delaySeconds?: unknown; housing?: unknown; environment?: unknown }): Caution[] {
  const delay = delayLimitCaution({ delaySeconds: asNumber(d.delaySeconds) })
  const out: Caution[] = delay ? [{ field: 'delaySeconds', message: delay }] : []
  // Humid places put water in the tubes and on the heads (common practice); the device's instructions decide.
  if (d.environment === 'humid' && d.housing === 'standard') {
    out.push({ field: 'housing', message: 'A humid location with a standard housing: a NEMA 4 or 4X housing is the usual choice. Follow the device’s instructions.' })
  }
  return out
}

/** Field → first message, for showing beside each input. */
export function fieldErrorsOf(error: z.ZodError): Record<string, string> {
  const out: Record<string, string> = {}
  for (const issue of error.issues) out[String(issue.path[0] ?? 'form')] ??= issue.message
  return out
}
