// The 24 VAC budget on a unit's control transformer, and the voltage left at the far end of a run.
// Detectors, accessories and remote test stations often take their power from the unit's own
// transformer, which also feeds the unit's controls: list those loads too when they are known.

import { loopOhms, type Awg } from './conductors'

export interface PowerLoad {
  label: string
  /** Draw with everything normal, VA (from the device's instructions). */
  standbyVa: number
  /** Draw in alarm, VA (from the device's instructions). */
  alarmVa: number
}

export interface PowerBudgetInput {
  /** The transformer's nameplate rating, VA. */
  transformerVa: number
  /** Secondary voltage; 24 unless told otherwise. */
  volts?: number
  loads: PowerLoad[]
}

export interface PowerBudget {
  standbyVa: number
  alarmVa: number
  ratingVa: number
  /** The Class 2 limit at this voltage (NEC Chapter 9 Table 11(A)); null above 30 V. */
  class2LimitVa: number | null
  /** The source of that limit, to show beside it. */
  class2Source: string
  /** Rating less the larger of the standby and alarm loads; negative when over. */
  headroomVa: number
  withinRating: boolean
  withinClass2: boolean
  /** Current drawn in alarm, A. */
  currentA: number
  /** Problems found, in plain words; empty when the budget is sound. */
  findings: string[]
}

// NEC Chapter 9 Table 11(A), Class 2 power sources not inherently limited; always check the
// edition the AHJ enforces:
//   0 V up to 20 V          → at most 5.0 × Vmax VA (from memory)
//   over 20 V up to 30 V    → at most 100 VA (NEC Chapter 9 Table 11(A), read in a reproduction)
/** NEC Chapter 9 Table 11(A): at most 5.0 × Vmax VA at 20 V and below (from memory). */
const CLASS2_VA_PER_VOLT_TO_20V = 5
/** NEC Chapter 9 Table 11(A): the voltage up to which the 5.0 × Vmax limit applies (from memory). */
const CLASS2_LOW_BAND_VOLTS = 20
/** NEC Chapter 9 Table 11(A): at most 100 VA over 20 V up to 30 V. */
export const CLASS2_MAX_VA = 100
/** NEC Chapter 9 Table 11(A): the top of the band this check covers; above it the limits are far lower (from memory). */
export const CLASS2_MAX_VOLTS = 30

/** Where the Class 2 figure for this voltage comes from, shown beside it wherever it appears. */
export function class2Source(volts: number): string {
  return volts <= CLASS2_LOW_BAND_VOLTS || volts > CLASS2_MAX_VOLTS ? 'NEC Chapter 9 Table 11(A), from memory' : 'NEC Chapter 9 Table 11(A)'
}

/**
 * The Class 2 power limit for a source of this maximum voltage (NEC Chapter 9 Table 11(A), from
 * memory): 5.0 × Vmax VA up to 20 V, 100 VA over 20 V up to 30 V. Null above 30 V, where this
 * check does not apply and a licensed electrician should review the circuit.
 */
export function class2LimitVa(volts: number): number | null {
  if (!(volts > 0) || volts > CLASS2_MAX_VOLTS) return null
  return volts <= CLASS2_LOW_BAND_VOLTS ? CLASS2_VA_PER_VOLT_TO_20V * volts : CLASS2_MAX_VA
}

/** Nominal control voltage on rooftop units and air handlers: common practice. */
export const CONTROL_VOLTS = 24

const va = (n: number) => `${Number(n.toFixed(1))} VA`

/** Current = VA ÷ V (40 VA at 24 V → 1.667 A). */
export function currentFor(voltAmps: number, volts = CONTROL_VOLTS): number {
  return voltAmps / volts
}

export function powerBudget(input: PowerBudgetInput): PowerBudget {
  const volts = input.volts ?? CONTROL_VOLTS
  const ratingVa = input.transformerVa
  const standbyVa = input.loads.reduce((sum, l) => sum + l.standbyVa, 0)
  const alarmVa = input.loads.reduce((sum, l) => sum + l.alarmVa, 0)
  const peakVa = Math.max(standbyVa, alarmVa)
  const headroomVa = ratingVa - peakVa
  const withinRating = headroomVa >= 0
  // A Class 2 source is limited in both power and voltage, so the transformer's own rating counts,
  // not just today's load (NEC Chapter 9 Table 11(A)).
  const limitVa = class2LimitVa(volts)
  const withinClass2 = limitVa !== null && ratingVa <= limitVa && peakVa <= limitVa

  const findings: string[] = []
  if (!withinRating) {
    const state = alarmVa >= standbyVa ? 'in alarm' : 'in standby'
    findings.push(
      `Load ${state} is ${va(peakVa)}, over the transformer's ${va(ratingVa)} rating by ${va(-headroomVa)}: ` +
        'the controls may drop out or the transformer overheat. Power some loads from a separate supply, ' +
        'or have a larger transformer fitted per the unit maker and licensed practice.',
    )
  }
  if (limitVa !== null && (peakVa > limitVa || ratingVa > limitVa)) {
    findings.push(
      `Beyond the Class 2 limit of ${va(limitVa)} at ${volts} V (${class2Source(volts)}): ` +
        (peakVa > limitVa ? `the load is ${va(peakVa)}. ` : `the source is rated ${va(ratingVa)}. `) +
        'Class 2 wiring rules do not cover this circuit; have a licensed electrician review it.',
    )
  }
  if (limitVa === null) {
    findings.push(
      `${volts} V is above the ${CLASS2_MAX_VOLTS} V this Class 2 check covers (${class2Source(volts)}): ` +
        'have a licensed electrician review the circuit.',
    )
  }
  return {
    standbyVa,
    alarmVa,
    ratingVa,
    class2LimitVa: limitVa,
    class2Source: class2Source(volts),
    headroomVa,
    withinRating,
    withinClass2,
    currentA: currentFor(alarmVa, volts),
    findings,
  }
}

export interface VoltageDropInput {
  currentA: number
  /** Length of the run, one way, in feet. */
  oneWayFeet: number
  awg: Awg
  stranded: boolean
  /** Voltage at the source; 24 unless told otherwise. */
  volts?: number
}

export interface VoltageDrop {
  dropV: number
  endVolts: number
  /** Drop as a percentage of the source voltage. */
  percent: number
}

/**
 * Voltage lost in both conductors of a run: current × 2 × one-way length × Ω/ft, with Ω per 1,000 ft
 * from NEC Chapter 9 Table 8 at 75 °C. Table 8 gives DC resistance; at 60 Hz on these small sizes
 * the difference is negligible (common practice). Compare `endVolts` with the device's listed
 * minimum operating voltage.
 */
export function voltageDrop(input: VoltageDropInput): VoltageDrop {
  const volts = input.volts ?? CONTROL_VOLTS
  const dropV = input.currentA * loopOhms(input.awg, input.stranded, input.oneWayFeet)
  return { dropV, endVolts: volts - dropV, percent: (dropV / volts) * 100 }
}
