// The fire alarm initiating loop as the panel sees it through a duct detector: expected ohms across
// the panel pair per detector state for a correctly wired supervised loop, and a diagnosis of
// measured readings that names the one or two wiring faults explaining them. Read-only for HVAC
// staff: the fire alarm contractor owns the panel and its wiring.
import { loopOhms, type Awg } from './conductors'
import { closedInNormal, contactState, DETECTOR_STATES, defaultContactModel, STATE_LABELS, type DetectorState, type Labelling, type Terminal } from './contacts'

export interface Arrangement {
  /** Resistor value the panel expects (set by the panel maker). */
  eolOhms: number
  /** EOL in series through the supervisory contact, or straight across the pair. */
  eolPlacement: 'through-supervisory' | 'across-pair'
  alarmTerminal: Terminal
  /** As labelled on the module. */
  supervisoryTerminal: Terminal
  supervisoryLabelledIn?: Labelling
  conductor: { awg: Awg; stranded: boolean; oneWayFeet: number }
  /** At the device the run adds nothing to the reading; the panel's line limit still applies to it. */
  measuredAt: 'panel' | 'device'
  /** The resistor's own tolerance as a fraction (default 0.05). */
  tolerance?: number
  /** Highest wire resistance the panel accepts (default 100 Ω: common practice, panel-specific). */
  maxLineOhms?: number
}

export type Reading = number | 'open'
export type Readings = Partial<Record<DetectorState, Reading>>
export type Expected = { ohms: number; min: number; max: number } | { open: true }

export type FindingCode =
  | 'open-conductor'
  | 'shorted-pair'
  | 'eol-missing'
  | 'eol-wrong-value'
  | 'alarm-on-nc'
  | 'alarm-in-series'
  | 'no-alarm-short'
  | 'supervisory-wrong-terminal'
  | 'trouble-reports-as-alarm'
  | 'contacts-swapped'
  | 'not-supervised'
  | 'line-resistance-high'
  | 'leakage'
  | 'record-differs'
  | 'unexplained'

export interface Finding {
  code: FindingCode
  state: DetectorState | null
  message: string
  /** An advisory does not fail the loop (the readings prove it; only the record is off). */
  advisory?: true
}

export interface Diagnosis {
  /** A correctly wired, supervised loop of this resistor, conductor and run, where the meter was held. */
  expected: Record<DetectorState, Expected>
  /** The wiring as recorded, present only when the record differs from a correct loop. */
  expectedAsRecorded?: Record<DetectorState, Expected>
  /** Both conductors of the run (NEC Chapter 9 Table 8), wherever the meter was held. */
  lineOhms: number
  verdict: 'pass' | 'fail' | 'incomplete'
  findings: Finding[]
}

// 5 % parts from the E24 series are the common EOL resistor (common practice).
export const DEFAULT_TOLERANCE = 0.05
// A handheld meter's resistance accuracy, about ±1 % of the reading (from memory; the meter's own
// specification rules).
export const METER_ACCURACY = 0.01
// ~100 Ω per conventional loop is a common figure (common practice; the panel's instructions rule).
export const DEFAULT_MAX_LINE_OHMS = 100
// Contact, lead and meter-lead resistance on a closed contact: common practice, a few ohms.
export const SHORT_ALLOWANCE_OHMS = 10
// A meter's over-range shows as 999,999 or more on many; anything there reads as open (common practice).
export const OPEN_OHMS = 999_999
// A reading this many times the resistor is no resistor at all: the panel sees an open (common practice).
const OPEN_FACTOR = 10

const round = (n: number, places = 2) => Math.round(n * 10 ** places) / 10 ** places

/** Both conductors of the recorded run. */
export function lineOhmsOf(a: Arrangement): number {
  return round(loopOhms(a.conductor.awg, a.conductor.stranded, a.conductor.oneWayFeet), 3)
}

/** The wire the meter sees: all of it at the panel, none at the device's own terminals. */
const seenLine = (a: Arrangement) => (a.measuredAt === 'device' ? 0 : lineOhmsOf(a))

// ---------------------------------------------------------------------------------------------
// Wiring faults. Each is one way the real loop differs from a correct one; a diagnosis tries every
// fault and every pair of faults and keeps those that fit every reading taken.

type Fault =
  | 'open'
  | 'short'
  | 'series'
  | 'leak'
  | 'eol-missing'
  | 'eol-value'
  | 'eol-across'
  | 'alarm-nc'
  | 'alarm-series-no'
  | 'alarm-series-nc'
  | 'alarm-none'
  | 'sup-wrong'
  | 'sup-across'
  | 'swapped'

const CODE: Record<Fault, FindingCode> = {
  open: 'open-conductor',
  short: 'shorted-pair',
  series: 'line-resistance-high',
  leak: 'leakage',
  'eol-missing': 'eol-missing',
  'eol-value': 'eol-wrong-value',
  'eol-across': 'not-supervised',
  'alarm-nc': 'alarm-on-nc',
  'alarm-series-no': 'alarm-in-series',
  'alarm-series-nc': 'alarm-in-series',
  'alarm-none': 'no-alarm-short',
  'sup-wrong': 'supervisory-wrong-terminal',
  'sup-across': 'trouble-reports-as-alarm',
  swapped: 'contacts-swapped',
}

/** Faults that act on the same part of the loop cannot both be present. */
const SLOT: Record<Fault, string[]> = {
  open: ['line'],
  short: ['line'],
  series: ['series'],
  leak: ['leak'],
  'eol-missing': ['eol'],
  'eol-value': ['eol'],
  'eol-across': ['eol', 'sup'],
  'alarm-nc': ['alarm'],
  'alarm-series-no': ['alarm'],
  'alarm-series-nc': ['alarm'],
  'alarm-none': ['alarm'],
  'sup-wrong': ['sup'],
  'sup-across': ['sup', 'eol'],
  swapped: ['alarm', 'sup'],
}

const FAULTS = Object.keys(CODE) as Fault[]
/** A cut or a short in the cable is out of the meter's sight at the device's own terminals. */
const LINE_ONLY: Fault[] = ['open', 'series']

function faultSets(measuredAt: Arrangement['measuredAt']): Fault[][] {
  const usable = FAULTS.filter((f) => measuredAt === 'panel' || !LINE_ONLY.includes(f))
  const sets: Fault[][] = usable.map((f) => [f])
  for (let i = 0; i < usable.length; i++)
    for (let j = i + 1; j < usable.length; j++) {
      if (SLOT[usable[i]].some((s) => SLOT[usable[j]].includes(s))) continue
      sets.push([usable[i], usable[j]])
    }
  return sets
}

/** Values a fault carries, fitted from the readings. */
interface Params {
  series: number
  /** Ω of wire between the meter and a short in the cable (one place, so the same in every state). */
  short: number
  eol: number
  leak: number
}

type Span = [number, number] // ohms, low to high; Infinity = open

const OPEN: Span = [Infinity, Infinity]
const parallel = (a: Span, b: Span): Span => [par(a[0], b[0]), par(a[1], b[1])]
const par = (x: number, y: number) => (x === 0 || y === 0 ? 0 : x === Infinity ? y : y === Infinity ? x : (x * y) / (x + y))
const series = (a: Span, b: Span): Span => [a[0] + b[0], a[1] + b[1]]
const contact = (closed: boolean): Span => (closed ? [0, 0] : OPEN)

/** Ohms across the pair, where the meter is held, for the loop with these faults in one state. */
function predict(a: Arrangement, faults: Fault[], p: Params, state: DetectorState, correctTerms = correctTerminals(a.supervisoryLabelledIn)): Span {
  const has = (f: Fault) => faults.includes(f)
  const model = defaultContactModel(a.supervisoryLabelledIn ?? 'de-energized')
  const closed = (c: 'alarm' | 'supervisory', t: Terminal) => contactState(model, c, state)[t === 'NO' ? 'C-NO' : 'C-NC'] === 'closed'
  const other = (t: Terminal): Terminal => (t === 'NO' ? 'NC' : 'NO')
  const alarmT = has('alarm-nc') ? other(correctTerms.alarmTerminal) : correctTerms.alarmTerminal
  const supT = has('sup-wrong') ? other(correctTerms.supervisoryTerminal) : correctTerms.supervisoryTerminal
  const line = seenLine(a)
  if (has('open')) return OPEN
  const tol = a.tolerance ?? DEFAULT_TOLERANCE
  const nominal = has('eol-value') ? p.eol : a.eolOhms
  const resistor: Span = has('eol-value') ? [p.eol, p.eol] : [nominal * (1 - tol), nominal * (1 + tol)]

  let device: Span = OPEN
  // Alarm contact across the pair (or, swapped, the supervisory contact in its place).
  const alarmAcross = has('alarm-series-no') || has('alarm-series-nc') || has('alarm-none') ? null : has('swapped') ? closed('supervisory', alarmT) : closed('alarm', alarmT)
  if (alarmAcross !== null) device = parallel(device, contact(alarmAcross))
  if (!has('eol-missing')) {
    let eolLeg: Span = resistor
    if (has('swapped')) eolLeg = series(eolLeg, contact(closed('alarm', supT)))
    else if (!has('eol-across') && !has('sup-across')) eolLeg = series(eolLeg, contact(closed('supervisory', supT)))
    if (has('alarm-series-no')) eolLeg = series(eolLeg, contact(closed('alarm', 'NO')))
    if (has('alarm-series-nc')) eolLeg = series(eolLeg, contact(closed('alarm', 'NC')))
    device = parallel(device, eolLeg)
  }
  // A supervisory contact wired like an alarm contact: its trouble-closing terminal across the pair.
  if (has('sup-across')) device = parallel(device, contact(closed('supervisory', other(supT))))
  if (has('leak')) device = parallel(device, [p.leak, p.leak])
  // Series resistance up to the panel's limit is a working loop; past it, the series fault.
  const wire: Span = [line + p.series, line + p.series]
  // From the panel a short hides the detector; from the device's terminals (panel end lifted) it
  // hangs across them through the wire back to where the conductors touch.
  if (has('short')) return a.measuredAt === 'panel' ? [p.short, p.short] : parallel(device, [p.short, p.short])
  return series(wire, device)
}

/** Wire a working loop may still carry before the panel's limit; at the device the run is out of the reading. */
const workingRoom = (a: Arrangement) => (a.measuredAt === 'device' ? 0 : Math.max(0, (a.maxLineOhms ?? DEFAULT_MAX_LINE_OHMS) - lineOhmsOf(a)))

/** Whether a reading agrees with a predicted span, allowing the meter and the contacts. */
function agrees(r: Reading, span: Span): boolean {
  const value = r === 'open' || r >= OPEN_OHMS ? Infinity : r
  if (span[0] === Infinity) return value === Infinity
  if (value === Infinity) return false
  // A loop still working carries wire up to the panel's limit: the panel sees alarm up to there.
  const lo = span[0] * (1 - METER_ACCURACY) - SHORT_ALLOWANCE_OHMS
  const hi = span[1] * (1 + METER_ACCURACY) + SHORT_ALLOWANCE_OHMS
  return value >= lo && value <= hi
}

const finite = (r: Reading | undefined): r is number => typeof r === 'number' && r < OPEN_OHMS

function hypotheses(a: Arrangement, readings: Readings, faults: Fault[]): Params[] {
  const line = seenLine(a)
  const values = DETECTOR_STATES.map((s) => readings[s]).filter(finite)
  // One series value for every state: past the panel's limit for the series fault, within it otherwise.
  const room = workingRoom(a)
  const extra = values.map((v) => v - line)
  const seriesH = faults.includes('series') ? extra.filter((v) => v > SHORT_ALLOWANCE_OHMS) : [0, ...extra.filter((v) => v > SHORT_ALLOWANCE_OHMS && v <= room)]
  const out: Params[] = []
  for (const s of seriesH) {
    const bare = values.map((v) => v - line - s).filter((v) => v > 0)
    // A leak alone reads as itself; beside the resistor it reads as the two in parallel.
    const leakH = faults.includes('leak') ? [...bare, ...bare.filter((v) => v < a.eolOhms).map((v) => 1 / (1 / v - 1 / a.eolOhms))] : [Infinity]
    for (const leak of leakH) {
      const eolH = faults.includes('eol-value')
        ? [...bare, ...bare.map((v) => (leak === Infinity ? v : 1 / (1 / v - 1 / leak))).filter((v) => v > 0)].filter(
            (v) => v >= a.eolOhms / OPEN_FACTOR && v <= a.eolOhms * OPEN_FACTOR,
          )
        : [a.eolOhms]
      // Seen from the device, the short's wire sits beside the detector: solve it out of the parallel pair.
      const beside = a.measuredAt === 'device' ? values.filter((v) => v > 0 && v < a.eolOhms).map((v) => 1 / (1 / v - 1 / a.eolOhms)) : []
      const shortH = faults.includes('short') ? [...values, ...beside].filter((v) => v <= lineOhmsOf(a) + s + SHORT_ALLOWANCE_OHMS) : [0]
      for (const eol of eolH) for (const short of shortH) out.push({ series: s, eol, leak, short })
    }
  }
  return out
}

interface Fit {
  faults: Fault[]
  params: Params
}

function fitsReadings(a: Arrangement, readings: Readings, faults: Fault[], taken: DetectorState[]): Fit | null {
  const room = workingRoom(a)
  for (const params of hypotheses(a, readings, faults)) {
    // Added series resistance is a fault only where it takes the loop past the panel's limit.
    if (faults.includes('series') && params.series <= room) continue
    if (taken.every((s) => agrees(readings[s] as Reading, predict(a, faults, params, s)))) return { faults, params }
  }
  return null
}

// ---------------------------------------------------------------------------------------------
// Expected readings

const toExpected = (span: Span): Expected =>
  span[0] === Infinity ? { open: true } : { ohms: round((span[0] + span[1]) / 2), min: round(Math.max(0, span[0] * (1 - METER_ACCURACY) - SHORT_ALLOWANCE_OHMS)), max: round(span[1] * (1 + METER_ACCURACY) + SHORT_ALLOWANCE_OHMS) }

/** A correctly wired supervised loop of this resistor, conductor and run, where the meter is held. */
export function expectedCorrect(a: Arrangement): Record<DetectorState, Expected> {
  return Object.fromEntries(DETECTOR_STATES.map((s) => [s, toExpected(predict(a, [], { series: 0, eol: a.eolOhms, leak: Infinity, short: 0 }, s))])) as Record<DetectorState, Expected>
}

/** The faults the recorded wiring itself carries, against a correct loop. */
function recordedFaults(a: Arrangement): Fault[] {
  const correct = correctTerminals(a.supervisoryLabelledIn)
  const out: Fault[] = []
  if (a.alarmTerminal !== correct.alarmTerminal) out.push('alarm-nc')
  if (a.eolPlacement === 'across-pair') out.push('eol-across')
  else if (a.supervisoryTerminal !== correct.supervisoryTerminal) out.push('sup-wrong')
  return out
}

/** The loop as recorded (which may itself be miswired), where the meter is held. */
export function expectedReadings(a: Arrangement): Record<DetectorState, Expected> {
  const faults = recordedFaults(a)
  return Object.fromEntries(DETECTOR_STATES.map((s) => [s, toExpected(predict(a, faults, { series: 0, eol: a.eolOhms, leak: Infinity, short: 0 }, s))])) as Record<DetectorState, Expected>
}

// ---------------------------------------------------------------------------------------------
// Words

const DEFER = 'The fire alarm contractor puts it right; HVAC staff do not open the panel or cut alarm wiring.'
const kohms = (n: number) => (n >= 1000 ? `${round(n / 1000, 1)} kΩ` : `${round(n, 0)} Ω`)
const format = (r: Reading) => (r === 'open' || r >= OPEN_OHMS ? 'open' : `${r.toLocaleString('en-US')} Ω`)
const stateWord = (s: DetectorState) => STATE_LABELS[s].split(' (')[0].toLowerCase()

/** What the panel would show for a reading: alarm up to its line limit, normal on the resistor, else trouble. */
function panelShows(r: Reading, a: Arrangement): 'alarm' | 'normal' | 'trouble' {
  if (r === 'open' || r >= OPEN_OHMS) return 'trouble'
  const line = seenLine(a)
  if (r <= (a.maxLineOhms ?? DEFAULT_MAX_LINE_OHMS) + SHORT_ALLOWANCE_OHMS) return 'alarm'
  const tol = (a.tolerance ?? DEFAULT_TOLERANCE) + METER_ACCURACY
  return Math.abs(r - line - a.eolOhms) <= tol * a.eolOhms + SHORT_ALLOWANCE_OHMS ? 'normal' : 'trouble'
}

/** "normal reads 4 Ω (the panel would show alarm)", for the states measured only. */
function seen(a: Arrangement, readings: Readings, taken: DetectorState[]): string {
  return taken.map((s) => `${stateWord(s)} reads ${format(readings[s] as Reading)} (the panel would show ${panelShows(readings[s] as Reading, a)})`).join('; ')
}

const LOOK: Record<FindingCode, (a: Arrangement, p: Params, line: number) => string> = {
  'open-conductor': () => 'Every state reads open: a conductor is cut or a splice or terminal has come loose between the panel and the detector. Look for a loose terminal, a broken splice or a damaged cable.',
  'shorted-pair': () => 'Every state reads as a short: the two conductors touch somewhere, or a jumper sits across the pair. Look for a pinched cable, a splice with bare copper or a stray jumper.',
  'eol-missing': () => 'The end-of-line resistor is not seen: missing, broken or on a terminal that is not in the loop.',
  'eol-wrong-value': (a, p) => `The resistor reads about ${kohms(p.eol)}, not the ${kohms(a.eolOhms)} the panel expects: it looks like the wrong value.`,
  'alarm-on-nc': () => 'The alarm contact looks wired to NC instead of NO: the panel would see alarm at rest and miss a real one.',
  'alarm-in-series': () => 'The alarm contact looks wired in series with the loop instead of across the pair: an alarm opens the loop, so the panel shows a trouble where it should show an alarm.',
  'no-alarm-short': () => 'Alarm does not short the pair: the alarm contact is not connected, or the detector did not trip during the test. Confirm the trip (LED, relay) before calling it a wiring fault.',
  'supervisory-wrong-terminal': () => 'The supervisory contact looks wired to the terminal that is open in normal (on many modules its marks describe the de-energized state).',
  'trouble-reports-as-alarm': () => 'A supervisory contact sits across the pair: a dirty head, an open cover or a power loss reaches the panel as an alarm, which means a false dispatch.',
  'contacts-swapped': () => 'The alarm and supervisory wires look landed on each other’s contacts.',
  'not-supervised': () => 'The resistor is straight across the pair, not through the supervisory contact: a dirty head, an open cover or a power loss would never reach the panel.',
  'line-resistance-high': (a, p, line) => `About ${round(p.series, 0)} Ω more than the ${round(line, 1)} Ω of wire, past the ${a.maxLineOhms ?? DEFAULT_MAX_LINE_OHMS} Ω the panel allows: look for a loose or corroded splice or terminal, or a longer or thinner run than recorded.`,
  leakage: (_a, p) => `Where the loop should read open it reads about ${kohms(p.leak)}: leakage between the conductors or to ground (wet box, damaged insulation). An insulation test is the fire alarm contractor’s work.`,
  'record-differs': () => '',
  unexplained: () => '',
}

// ---------------------------------------------------------------------------------------------

/** States that must be measured to prove the loop: the resistor, the short, and supervision. */
function missingProof(readings: Readings): boolean {
  return readings.normal === undefined || readings.alarm === undefined || (readings.trouble === undefined && readings.unpowered === undefined)
}

function recordFindings(a: Arrangement): Finding[] {
  const model = defaultContactModel(a.supervisoryLabelledIn ?? 'de-energized')
  const out: Finding[] = []
  if (a.alarmTerminal === 'NC') out.push({ code: 'alarm-on-nc', state: null, message: `Recorded with the alarm contact on NC: the panel would see alarm at rest and only the resistor when the detector trips, so a real alarm never reaches it. It should use NO. ${DEFER}` })
  if (a.eolPlacement === 'across-pair') {
    out.push({ code: 'not-supervised', state: null, message: `Recorded with the resistor straight across the pair: a trouble or a power loss at the detector would not reach the panel. The resistor belongs in series through the supervisory contact. ${DEFER}` })
  } else if (a.supervisoryTerminal !== closedInNormal(model, 'supervisory')) {
    out.push({ code: 'supervisory-wrong-terminal', state: null, message: `Recorded on supervisory ${a.supervisoryTerminal}, the terminal that is open in normal on this module (labelled ${a.supervisoryLabelledIn ?? 'de-energized'}): the panel would show trouble at rest. Use ${closedInNormal(model, 'supervisory')}. ${DEFER}` })
  }
  return out
}

export function diagnose(a: Arrangement, readings: Readings): Diagnosis {
  const lineOhms = lineOhmsOf(a)
  const expected = expectedCorrect(a)
  const recorded = recordedFaults(a)
  const findings: Finding[] = []
  const taken = DETECTOR_STATES.filter((s) => readings[s] !== undefined)
  const max = a.maxLineOhms ?? DEFAULT_MAX_LINE_OHMS
  if (lineOhms > max) {
    findings.push({ code: 'line-resistance-high', state: null, message: `The recorded run adds ${round(lineOhms, 1)} Ω of wire, above the ${max} Ω the panel allows (wherever the meter is held): a heavier conductor or a shorter run is needed. ${DEFER}` })
  }

  const correctFit = taken.length > 0 ? fitsReadings(a, readings, [], taken) : null
  if (taken.length === 0 || (correctFit && missingProof(readings))) {
    // Nothing measured proves the wiring either way: the record speaks for itself.
    findings.push(...recordFindings(a))
  } else if (correctFit) {
    if (recorded.length > 0)
      findings.push({ code: 'record-differs', state: null, advisory: true, message: `The readings fit a correctly wired, supervised loop, but the record says otherwise (${recorded.map((f) => CODE[f]).join(', ')}). Correct the record to match the wiring.` })
  } else {
    const sets = faultSets(a.measuredAt)
    let fits = sets.filter((s) => s.length === 1).map((s) => fitsReadings(a, readings, s, taken)).filter((f): f is Fit => f !== null)
    if (fits.length === 0) fits = sets.filter((s) => s.length === 2).map((s) => fitsReadings(a, readings, s, taken)).filter((f): f is Fit => f !== null)
    const line = seenLine(a)
    const state = taken.find((s) => !agrees(readings[s] as Reading, predict(a, [], { series: 0, eol: a.eolOhms, leak: Infinity, short: 0 }, s))) ?? null
    if (fits.length === 0) {
      const e = (s: DetectorState) => expected[s]
      const want = (s: DetectorState) => ('open' in e(s) ? 'open' : `${(e(s) as { min: number }).min.toLocaleString('en-US')}–${(e(s) as { max: number }).max.toLocaleString('en-US')} Ω`)
      findings.push({
        code: 'unexplained',
        state,
        message: `${seen(a, readings, taken)}. A correct loop reads ${taken.map((s) => `${stateWord(s)} ${want(s)}`).join(', ')}, and no one or two wiring faults explain these readings together. Re-check the meter, the leads and which state the detector was in, then report it to the fire alarm contractor.`,
      })
    } else {
      const together = fits.length > 1 ? ' The readings fit more than one wiring; check each.' : ''
      for (const fit of fits) {
        const pair = fit.faults.length === 2
        for (const f of fit.faults) {
          const code = CODE[f]
          if (findings.some((x) => x.code === code && !x.advisory && x.state !== null)) continue
          const partner = pair ? ` Together with ${CODE[fit.faults.find((g) => g !== f) as Fault]}, this explains the readings.` : ''
          findings.push({ code, state, message: `${seen(a, readings, taken)}. ${LOOK[code](a, fit.params, line)}${partner}${together} ${DEFER}` })
        }
      }
    }
  }

  // A record that is itself miswired stays flagged unless the readings prove the loop correct.
  if (taken.length > 0 && !correctFit) for (const f of recordFindings(a)) if (!findings.some((x) => x.code === f.code)) findings.push(f)

  const faulty = findings.some((f) => !f.advisory)
  const verdict = faulty ? 'fail' : missingProof(readings) ? 'incomplete' : 'pass'
  const out: Diagnosis = { expected, lineOhms, verdict, findings }
  if (recorded.length > 0) out.expectedAsRecorded = expectedReadings(a)
  return out
}

/** What a correct tamper-circuit loop looks like for a module's labelling. */
export function correctTerminals(labelling: Labelling = 'de-energized') {
  return { alarmTerminal: 'NO' as Terminal, supervisoryTerminal: closedInNormal(defaultContactModel(labelling), 'supervisory') }
}
