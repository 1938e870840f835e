// The fire alarm initiating loop as the panel sees it through a duct detector: expected ohms across
// the panel pair per detector state, and a diagnosis of measured readings that names the likely
// miswire. Read-only for HVAC staff: the fire alarm contractor owns the panel and its wiring.
import { loopOhms, type Awg } from './conductors'
import { closedInNormal, contactState, DETECTOR_STATES, defaultContactModel, type DetectorState, type Labelling, type Terminal } from './contacts'

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
  /** At the device the wire adds nothing; at the panel it adds both conductors. */
  measuredAt: 'panel' | 'device'
  /** Fraction of the EOL value a normal reading may stray (default 0.1). */
  tolerance?: number
  /** Highest wire resistance the panel accepts (default 100 Ω: common practice, panel-specific). */
  maxLineOhms?: number
}

export type Reading = number | 'open'
export type Readings = Partial<Record<DetectorState, Reading>>
export type Expected = { ohms: number; min: number; max: number } | { open: true }

export type FindingCode =
  | 'eol-missing'
  | 'eol-wrong-value'
  | 'alarm-on-nc'
  | 'supervisory-wrong-terminal'
  | 'not-supervised'
  | 'line-resistance-high'
  | 'unexplained'

export interface Finding {
  code: FindingCode
  state: DetectorState | null
  message: string
}

export interface Diagnosis {
  expected: Record<DetectorState, Expected>
  lineOhms: number
  verdict: 'pass' | 'fail' | 'incomplete'
  findings: Finding[]
}

export const DEFAULT_TOLERANCE = 0.1
// ~100 Ω per conventional loop is a common figure (common practice; the panel's instructions rule).
export const DEFAULT_MAX_LINE_OHMS = 100
// Contact, lead and meter resistance on a closed contact: common practice, a few ohms.
export const SHORT_ALLOWANCE_OHMS = 10
// A meter over-range or anything above 1 MΩ reads as open: common practice.
export const OPEN_OHMS = 1_000_000

const round = (n: number, places = 2) => Math.round(n * 10 ** places) / 10 ** places

export function lineOhmsOf(a: Arrangement): number {
  return a.measuredAt === 'device' ? 0 : round(loopOhms(a.conductor.awg, a.conductor.stranded, a.conductor.oneWayFeet), 3)
}

/** How the loop is actually wired, which may differ from what was recorded. */
interface Wiring {
  eolOhms: number | null
  eolPlacement: Arrangement['eolPlacement']
  alarmTerminal: Terminal
  supervisoryTerminal: Terminal
  extraSeriesOhms: number
}

function wiringOf(a: Arrangement): Wiring {
  return { eolOhms: a.eolOhms, eolPlacement: a.eolPlacement, alarmTerminal: a.alarmTerminal, supervisoryTerminal: a.supervisoryTerminal, extraSeriesOhms: 0 }
}

/** Ohms across the panel pair for one wiring in one state (null = open). */
function resistance(w: Wiring, labelling: Labelling, line: number, state: DetectorState): number | null {
  const model = defaultContactModel(labelling)
  const closed = (contact: 'alarm' | 'supervisory', terminal: Terminal) =>
    contactState(model, contact, state)[terminal === 'NO' ? 'C-NO' : 'C-NC'] === 'closed'
  const series = line + w.extraSeriesOhms
  if (closed('alarm', w.alarmTerminal)) return series
  const eolPath = w.eolOhms !== null && (w.eolPlacement === 'across-pair' || closed('supervisory', w.supervisoryTerminal))
  return eolPath ? series + (w.eolOhms as number) : null
}

export function expectedReadings(a: Arrangement): Record<DetectorState, Expected> {
  const line = lineOhmsOf(a)
  const tol = a.tolerance ?? DEFAULT_TOLERANCE
  const labelling = a.supervisoryLabelledIn ?? 'de-energized'
  const out = {} as Record<DetectorState, Expected>
  for (const state of DETECTOR_STATES) {
    const r = resistance(wiringOf(a), labelling, line, state)
    if (r === null) out[state] = { open: true }
    else if (r <= line) out[state] = { ohms: round(line), min: 0, max: round(line + SHORT_ALLOWANCE_OHMS) }
    else out[state] = { ohms: round(r), min: round(r - tol * a.eolOhms), max: round(r + tol * a.eolOhms) }
  }
  return out
}

type Klass = 'open' | 'short' | 'eol' | 'low' | 'high'

function classify(r: Reading, a: Arrangement, line: number): Klass {
  if (r === 'open' || r >= OPEN_OHMS) return 'open'
  if (r <= line + SHORT_ALLOWANCE_OHMS) return 'short'
  const tol = (a.tolerance ?? DEFAULT_TOLERANCE) * a.eolOhms
  const eol = a.eolOhms + line
  if (Math.abs(r - eol) <= tol) return 'eol'
  return r < eol ? 'low' : 'high'
}

function klassOfValue(r: number | null, a: Arrangement, line: number): Klass {
  return classify(r === null ? 'open' : r, a, line)
}

const format = (r: Reading) => (r === 'open' ? 'open' : `${r.toLocaleString('en-US')} Ω`)
const kohms = (n: number) => `${round(n / 1000, 1)} kΩ`

const DEFER = 'Report it to the fire alarm contractor; HVAC staff do not alter the panel or cut alarm wiring.'

const other = (t: Terminal): Terminal => (t === 'NO' ? 'NC' : 'NO')

interface Candidate {
  /** null: the readings show a correct loop (the record may still be wrong, flagged separately). */
  code: Exclude<FindingCode, 'unexplained'> | null
  /** Classes a reading may take in a state if this is how the loop is really wired. */
  signature: (state: DetectorState, a: Arrangement, line: number) => Klass[]
  message: (a: Arrangement, readings: Readings, line: number) => string
}

/** The loop as it should be: resistor through the supervisory contact, alarm on NO. */
function correctWiring(a: Arrangement): Wiring {
  return { ...wiringOf(a), eolPlacement: 'through-supervisory', ...correctTerminals(a.supervisoryLabelledIn) }
}

function predicted(w: Wiring, state: DetectorState, a: Arrangement, line: number): Klass {
  return klassOfValue(resistance(w, a.supervisoryLabelledIn ?? 'de-energized', line, state), a, line)
}

function fault(mutate: (w: Wiring) => Wiring) {
  return (state: DetectorState, a: Arrangement, line: number): Klass[] => [predicted(mutate(correctWiring(a)), state, a, line)]
}

/** Where a correct loop shows the resistor, a value fault shows something else; elsewhere the same. */
function valueFault(whereEol: Klass[], whereShort: Klass[]) {
  return (state: DetectorState, a: Arrangement, line: number): Klass[] => {
    const base = predicted(correctWiring(a), state, a, line)
    return base === 'eol' ? whereEol : base === 'short' ? whereShort : [base]
  }
}

// Each candidate is one way the real wiring can differ from a correct loop. The diagnosis keeps
// those whose predicted readings match every reading taken.
const CANDIDATES: Candidate[] = [
  { code: null, signature: fault((w) => w), message: () => '' },
  {
    code: 'eol-missing',
    signature: fault((w) => ({ ...w, eolOhms: null })),
    message: () => `Normal reads open: the panel would see no end-of-line resistor and show a trouble. The resistor may be missing, broken or on the wrong terminal. ${DEFER}`,
  },
  {
    code: 'eol-wrong-value',
    signature: valueFault(['low', 'high'], ['short']),
    message: (a, r, line) => {
      const seen = typeof r.normal === 'number' ? ` (about ${kohms(r.normal - line)} after the wire)` : ''
      return `Normal reads ${r.normal === undefined ? 'off' : format(r.normal)}${seen}, not the ${kohms(a.eolOhms)} the panel expects: the end-of-line resistor looks like the wrong value. ${DEFER}`
    },
  },
  {
    code: 'alarm-on-nc',
    signature: fault((w) => ({ ...w, alarmTerminal: other(w.alarmTerminal) })),
    message: () => `The loop reads shorted in normal and shows the resistor in alarm: the alarm contact looks wired to NC instead of NO. The panel would show alarm at rest and miss a real one. ${DEFER}`,
  },
  {
    code: 'supervisory-wrong-terminal',
    signature: fault((w) => ({ ...w, supervisoryTerminal: other(w.supervisoryTerminal) })),
    message: () => `Normal reads open but trouble or power-off shows the resistor: the supervisory contact looks wired to the terminal that is open in normal (on many modules its marks describe the de-energized state). ${DEFER}`,
  },
  {
    code: 'not-supervised',
    signature: fault((w) => ({ ...w, eolPlacement: 'across-pair' })),
    message: () => `Trouble or power-off still shows the resistor: the loop is not routed through the supervisory contact, so a dirty head, an open cover or loss of power would never reach the panel. ${DEFER}`,
  },
  {
    code: 'line-resistance-high',
    signature: valueFault(['eol', 'high'], ['low']),
    message: (a, r, line) => {
      const extra = typeof r.alarm === 'number' ? `, about ${round(r.alarm - line, 1)} Ω more than the wire accounts for` : ''
      return `Alarm does not read as a clean short${extra}: look for a loose or corroded splice or terminal, or a longer or thinner run than recorded. ${DEFER}`
    },
  },
]

const asRecordedSignature = (state: DetectorState, a: Arrangement, line: number): Klass[] => [predicted(wiringOf(a), state, a, line)]

/** Series resistance a high-line fault adds must be the same in normal and in alarm. */
function consistentExtra(a: Arrangement, readings: Readings, line: number): boolean {
  if (typeof readings.normal !== 'number' || typeof readings.alarm !== 'number') return true
  const extraAlarm = readings.alarm - line
  const extraNormal = readings.normal - line - a.eolOhms
  return Math.abs(extraNormal - extraAlarm) <= (a.tolerance ?? DEFAULT_TOLERANCE) * a.eolOhms
}

/** The terminal fault findings that follow from the recorded arrangement alone. */
function arrangementFindings(a: Arrangement, line: number): Finding[] {
  const findings: Finding[] = []
  const model = defaultContactModel(a.supervisoryLabelledIn ?? 'de-energized')
  if (a.alarmTerminal === 'NC') {
    findings.push({ code: 'alarm-on-nc', state: null, message: `Recorded with the alarm contact on NC: the panel would see a short at rest, and only the resistor (normal) when the detector trips, so a real alarm never reaches it. It should use NO. ${DEFER}` })
  }
  if (a.eolPlacement === 'across-pair') {
    findings.push({ code: 'not-supervised', state: null, message: `Recorded with the resistor straight across the pair: trouble and loss of power at the detector would not reach the panel. The resistor belongs in series through the supervisory contact. ${DEFER}` })
  } else if (a.supervisoryTerminal !== closedInNormal(model, 'supervisory')) {
    findings.push({ code: 'supervisory-wrong-terminal', state: null, message: `Recorded on supervisory ${a.supervisoryTerminal}, the terminal that is open in normal on this module (labelled ${a.supervisoryLabelledIn ?? 'de-energized'}): the panel would show trouble at rest. Use ${closedInNormal(model, 'supervisory')}. ${DEFER}` })
  }
  const max = a.maxLineOhms ?? DEFAULT_MAX_LINE_OHMS
  if (line > max) {
    findings.push({ code: 'line-resistance-high', state: null, message: `The run adds ${round(line, 1)} Ω, above the ${max} Ω the panel allows: a heavier conductor or a shorter run is needed. ${DEFER}` })
  }
  return findings
}

/** States that must be measured to prove the loop: the resistor, the short, and supervision. */
function missingProof(readings: Readings): boolean {
  return readings.normal === undefined || readings.alarm === undefined || (readings.trouble === undefined && readings.unpowered === undefined)
}

export function diagnose(a: Arrangement, readings: Readings): Diagnosis {
  const line = lineOhmsOf(a)
  const expected = expectedReadings(a)
  const findings = arrangementFindings(a, line)
  const taken = DETECTOR_STATES.filter((s) => readings[s] !== undefined)
  const measured = Object.fromEntries(taken.map((s) => [s, classify(readings[s] as Reading, a, line)])) as Partial<Record<DetectorState, Klass>>

  const fits = (signature: Candidate['signature']) => taken.every((s) => signature(s, a, line).includes(measured[s] as Klass))
  const offRecord = taken.filter((s) => !asRecordedSignature(s, a, line).includes(measured[s] as Klass))

  if (offRecord.length > 0) {
    const explained = CANDIDATES.filter((c) => fits(c.signature) && (c.code !== 'line-resistance-high' || consistentExtra(a, readings, line)))
    // Readings that fit a correct loop name no wiring fault of their own; the record's faults are
    // already flagged above, and a state not measured leaves the verdict incomplete.
    const fitsCorrect = explained.some((c) => c.code === null)
    if (explained.length === 0) {
      for (const s of offRecord) {
        const e = expected[s]
        const want = 'open' in e ? 'open' : `${e.min.toLocaleString('en-US')}–${e.max.toLocaleString('en-US')} Ω`
        findings.push({
          code: 'unexplained',
          state: s,
          message: `${s[0].toUpperCase()}${s.slice(1)} reads ${format(readings[s] as Reading)}, expected ${want}, and no single miswire explains the readings together. Re-check the meter and leads, then report to the fire alarm contractor.`,
        })
      }
    }
    for (const c of fitsCorrect ? [] : explained) {
      if (c.code === null || findings.some((f) => f.code === c.code)) continue
      findings.push({ code: c.code, state: offRecord[0], message: c.message(a, readings, line) })
    }
  }

  const verdict = findings.length > 0 ? 'fail' : missingProof(readings) ? 'incomplete' : 'pass'
  return { expected, lineOhms: line, verdict, findings }
}

/** What a correct tamper-circuit loop looks like for a module's labelling. */
export function correctTerminals(labelling: Labelling = 'de-energized') {
  return { alarmTerminal: 'NO' as Terminal, supervisoryTerminal: closedInNormal(defaultContactModel(labelling), 'supervisory') }
}
