// An independent model of a duct detector's two-wire initiating loop, for tests only: the engine
// never imports it. The loop is described as a small network of resistors, contacts and conductor
// segments and reduced by plain series and parallel rules, so its figures come from the circuit and
// not from the engine's own reasoning.

/** NEC (NFPA 70) Chapter 9 Table 8, uncoated copper, ohms per 1,000 ft at 75 °C. */
export const TABLE_8_OHMS_PER_KFT = {
  18: { solid: 7.77, stranded: 7.95 },
  16: { solid: 4.89, stranded: 4.99 },
  14: { solid: 3.07, stranded: 3.14 },
  12: { solid: 1.93, stranded: 1.98 },
} as const
export type Gauge = keyof typeof TABLE_8_OHMS_PER_KFT

// A good crimped or twisted splice adds a few milliohms (common practice); two per run here.
const GOOD_SPLICE_OHMS = 0.005

export type State = 'normal' | 'alarm' | 'trouble' | 'unpowered'
export const STATES: State[] = ['normal', 'alarm', 'trouble', 'unpowered']
export type Mark = 'NO' | 'NC'

type Net = { r: number } | { series: Net[] } | { parallel: Net[] }
const OPEN: Net = { r: Infinity }
const WIRE = (ohms: number): Net => ({ r: ohms })

/** Plain reduction: series adds, parallel adds conductances; Infinity is an open. */
export function reduce(n: Net): number {
  if ('r' in n) return n.r
  if ('series' in n) return n.series.reduce((sum, p) => sum + reduce(p), 0)
  const g = n.parallel.reduce((sum, p) => {
    const r = reduce(p)
    return r === 0 ? Infinity : sum + 1 / r
  }, 0)
  return g === Infinity ? 0 : g === 0 ? Infinity : 1 / g
}

// Relays: the alarm relay pulls in only on alarm; the supervisory relay is held in while the module
// is powered and healthy, and drops on trouble or loss of power (fail-safe; common practice).
const energized = (relay: 'alarm' | 'supervisory', s: State) => (relay === 'alarm' ? s === 'alarm' : s === 'normal' || s === 'alarm')

/**
 * Whether C–mark is closed. Marks describe the relay in the labelled position: the alarm contact is
 * labelled in normal (de-energized); the supervisory one either in its de-energized state or in
 * normal operation (energized). Common practice; the device's instructions rule.
 */
export function closed(relay: 'alarm' | 'supervisory', mark: Mark, s: State, supLabel: 'de-energized' | 'normal'): boolean {
  const labelledEnergized = relay === 'supervisory' && supLabel === 'normal'
  const noClosed = energized(relay, s) !== labelledEnergized
  return mark === 'NO' ? noClosed : !noClosed
}
const sw = (on: boolean): Net => (on ? { r: 0 } : OPEN)

export type ModelFault =
  | 'open-conductor'
  | 'shorted-pair'
  | 'eol-missing'
  | 'eol-wrong-value'
  | 'eol-across-pair'
  | 'alarm-on-nc'
  | 'alarm-in-series-nc'
  | 'alarm-in-series-no'
  | 'alarm-not-connected'
  | 'supervisory-wrong-terminal'
  | 'supervisory-across-pair'
  | 'contacts-swapped'
  | 'series-resistance'
  | 'leakage'

/** The finding a diagnosis should name for each fault. */
export const NAMED: Record<ModelFault, string> = {
  'open-conductor': 'open-conductor',
  'shorted-pair': 'shorted-pair',
  'eol-missing': 'eol-missing',
  'eol-wrong-value': 'eol-wrong-value',
  'eol-across-pair': 'not-supervised',
  'alarm-on-nc': 'alarm-on-nc',
  'alarm-in-series-nc': 'alarm-in-series',
  'alarm-in-series-no': 'alarm-in-series',
  'alarm-not-connected': 'no-alarm-short',
  'supervisory-wrong-terminal': 'supervisory-wrong-terminal',
  'supervisory-across-pair': 'trouble-reports-as-alarm',
  'contacts-swapped': 'contacts-swapped',
  'series-resistance': 'line-resistance-high',
  leakage: 'leakage',
}

/** Which part of the loop a fault changes; two faults on one part are not a pair. */
const PART: Record<ModelFault, string[]> = {
  'open-conductor': ['cable'],
  'shorted-pair': ['cable'],
  'eol-missing': ['eol'],
  'eol-wrong-value': ['eol'],
  'eol-across-pair': ['eol', 'sup'],
  'alarm-on-nc': ['alarm'],
  'alarm-in-series-nc': ['alarm'],
  'alarm-in-series-no': ['alarm'],
  'alarm-not-connected': ['alarm'],
  'supervisory-wrong-terminal': ['sup'],
  'supervisory-across-pair': ['sup', 'eol'],
  'contacts-swapped': ['alarm', 'sup'],
  'series-resistance': ['splice'],
  leakage: ['insulation'],
}
export const MODEL_FAULTS = Object.keys(PART) as ModelFault[]
export const compatible = (a: ModelFault, b: ModelFault) => a !== b && !PART[a].some((p) => PART[b].includes(p))

export interface Loop {
  eolOhms: number
  gauge: Gauge
  stranded: boolean
  oneWayFeet: number
  supLabel: 'de-energized' | 'normal'
  measuredAt: 'panel' | 'device'
  faults: ModelFault[]
  /** The resistor actually fitted where the fault is a wrong value. */
  wrongEolOhms?: number
  /** Extra series resistance of a bad splice. */
  spliceOhms?: number
  /** Insulation resistance between the conductors where they leak. */
  leakOhms?: number
}

/** Ω of one conductor over the whole run. */
export const conductorOhms = (l: Pick<Loop, 'gauge' | 'stranded' | 'oneWayFeet'>) => (l.oneWayFeet * TABLE_8_OHMS_PER_KFT[l.gauge][l.stranded ? 'stranded' : 'solid']) / 1000

/** The detector's terminals as a two-terminal network in one state. */
function device(l: Loop, s: State): Net {
  const has = (f: ModelFault) => l.faults.includes(f)
  // Correct: alarm NO across the pair; resistor through the supervisory mark closed in normal.
  const supMark: Mark = closed('supervisory', 'NO', 'normal', l.supLabel) ? 'NO' : 'NC'
  const other = (m: Mark): Mark => (m === 'NO' ? 'NC' : 'NO')
  const eol = has('eol-missing') ? OPEN : { r: has('eol-wrong-value') ? (l.wrongEolOhms as number) : l.eolOhms }
  const branches: Net[] = []
  const leg: Net[] = [eol]
  // Contacts swapped: the alarm pair lands on the supervisory contact's NO and the loop's resistor
  // leg on the alarm contact's supervisory mark.
  if (has('contacts-swapped')) {
    branches.push(sw(closed('supervisory', 'NO', s, l.supLabel)))
    leg.push(sw(closed('alarm', supMark, s, l.supLabel)))
  } else {
    if (has('alarm-in-series-nc')) leg.push(sw(closed('alarm', 'NC', s, l.supLabel)))
    else if (has('alarm-in-series-no')) leg.push(sw(closed('alarm', 'NO', s, l.supLabel)))
    else if (!has('alarm-not-connected')) branches.push(sw(closed('alarm', has('alarm-on-nc') ? 'NC' : 'NO', s, l.supLabel)))
    if (has('supervisory-across-pair')) branches.push(sw(closed('supervisory', other(supMark), s, l.supLabel)))
    else if (!has('eol-across-pair')) leg.push(sw(closed('supervisory', has('supervisory-wrong-terminal') ? other(supMark) : supMark, s, l.supLabel)))
  }
  branches.push({ series: leg })
  return { parallel: branches }
}

/**
 * The pair as the meter sees it. At the panel: the meter, both conductors (with two good splices,
 * any bad splice or cut), any short halfway along, then the detector (and any leak in its box). At the device: the
 * meter across the detector's terminals, with the cable (panel end lifted) hanging in parallel.
 */
export function network(l: Loop, s: State): Net {
  const half = WIRE(conductorOhms(l) / 2)
  const has = (f: ModelFault) => l.faults.includes(f)
  const cut = has('open-conductor') ? [OPEN] : []
  const splice = WIRE(GOOD_SPLICE_OHMS + (has('series-resistance') ? (l.spliceOhms as number) : 0))
  const across: Net[] = has('shorted-pair') ? [{ r: 0 }] : []
  // Leakage where water gets in: the detector's own box, across its terminals.
  const atDetector: Net = { parallel: [device(l, s), ...(has('leakage') ? [{ r: l.leakOhms as number }] : [])] }
  if (l.measuredAt === 'panel') {
    // Out and back: each conductor's near half, then what bridges the pair there, then the far halves and the detector.
    const far: Net = { series: [half, half, WIRE(GOOD_SPLICE_OHMS), atDetector] }
    return { series: [half, half, splice, ...cut, { parallel: [...across, far] }] }
  }
  // Panel end lifted: the cable's far end is open, so only what bridges the pair mid-run is seen.
  const stub: Net = { series: [half, half, { parallel: [...across, OPEN] }] }
  return { parallel: [atDetector, stub] }
}

export type Meter = number | 'open'
/** A meter over-range at 999,999 Ω or more shows open (common practice); readings to 0.1 Ω. */
export function read(l: Loop): Record<State, Meter> {
  return Object.fromEntries(
    STATES.map((s) => {
      const r = reduce(network(l, s))
      return [s, r >= 999_999 ? 'open' : Math.round(r * 10) / 10]
    }),
  ) as Record<State, Meter>
}
