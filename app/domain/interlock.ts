import { CLASS2_MAX_VOLTS } from './power'

// The HVAC side of a duct detector: an auxiliary contact that stops the unit in alarm. Unit controls
// take one of two input styles (common practice), and wiring one like the other is a classic miswire:
// the unit is stopped for good, or never stops. Nothing here touches the alarm or supervisory
// contacts: those belong to the fire alarm side and the alarm contractor.

export type InterlockStyle = 'break-to-stop' | 'make-to-stop'

export interface InterlockPlan {
  style: InterlockStyle
  wiring: Array<{ from: string; to: string }>
  /** The auxiliary contact terminal that feeds the unit's input. */
  contact: 'NC' | 'NO'
  expected: {
    normal: { volts: 24 | 0; unitRuns: true }
    alarm: { volts: 0 | 24; unitRuns: false }
  }
  steps: string[]
}

export type InterlockFindingCode =
  | 'wired-for-other-style'
  | 'no-source'
  | 'unit-did-not-stop'
  | 'stuck-stopped'
  | 'unexpected-voltage'
  | 'line-voltage'
  | 'detector-did-not-trip'
  | 'input-did-not-change'

export interface InterlockFinding {
  code: InterlockFindingCode
  message: string
}

export interface InterlockMeasurement {
  style: InterlockStyle
  measured: {
    /** AC volts at the unit's input, measured to the unit's 24 VAC common, detector normal. */
    normalVolts?: number
    /** The same, detector tripped. */
    alarmVolts?: number
    /** The unit stopped when the detector was tripped. */
    unitStopped?: boolean
    /** The detector went into alarm when tripped (its alarm LED lit); false when it did not. */
    detectorTripped?: boolean
  }
}

export interface InterlockDiagnosis {
  verdict: 'pass' | 'fail' | 'incomplete'
  findings: InterlockFinding[]
}

// Reading bands on a nominal 24 VAC circuit: common practice. At or above 18 V the source is there
// (allowing for a loaded transformer and drop on the run); at or below 3 V it is not (allowing for
// induced "ghost" voltage on a digital meter); anything between is neither and needs a second look.
export const PRESENT_MIN_VOLTS = 18
export const ABSENT_MAX_VOLTS = 3
// A Class 2 control circuit is at most 30 V (NEC Chapter 9 Table 11(A)); a 24 VAC transformer reads
// up to about 28 V unloaded (common practice). Above 30 V the input carries something else: line voltage.
export const LINE_MIN_VOLTS = CLASS2_MAX_VOLTS

const INPUT: Record<InterlockStyle, string> = {
  'break-to-stop': 'unit stop/safety input',
  'make-to-stop': 'unit smoke shutdown input',
}

const OTHER: Record<InterlockStyle, InterlockStyle> = {
  'break-to-stop': 'make-to-stop',
  'make-to-stop': 'break-to-stop',
}

/**
 * Break-to-stop: the unit runs only while 24 VAC is on its stop input, so the source goes to an
 * auxiliary C and NC to the input; alarm opens NC and the unit stops. Make-to-stop: 24 VAC on the
 * shutdown input stops the unit, so C and NO; alarm closes NO. Both: common practice.
 */
export function interlockPlan(style: InterlockStyle, sourceLabel = 'R (24 VAC)'): InterlockPlan {
  const breaks = style === 'break-to-stop'
  const contact = breaks ? 'NC' : 'NO'
  const input = INPUT[style]
  const normalV = breaks ? 24 : 0
  const alarmV = breaks ? 0 : 24
  return {
    style,
    wiring: [
      { from: sourceLabel, to: 'auxiliary contact C' },
      { from: `auxiliary contact ${contact}`, to: input },
    ],
    contact,
    expected: {
      normal: { volts: normalV, unitRuns: true },
      alarm: { volts: alarmV, unitRuns: false },
    },
    steps: [
      'Notify the monitoring company and site management before touching anything, and ask for the system to be ' +
        'placed in test. Record who was told, when, for how long, and any confirmation number.',
      'Work only on the auxiliary contact and the unit’s controls. Leave the alarm and supervisory contacts and all ' +
        'fire alarm wiring alone: they belong to the alarm contractor. Follow the device’s and the unit’s instructions, ' +
        'local codes and licensed practice; line voltage may be present in the unit’s control compartment.',
      `Confirm from the unit’s wiring diagram that its input is ${style}, and that ${sourceLabel} goes to ` +
        `auxiliary C and auxiliary ${contact} to the ${input}.`,
      `With the detector normal and the unit running, measure AC volts from the ${input} to the unit’s 24 VAC ` +
        `common: expect about ${normalV} V.`,
      'Trip the detector the way its instructions say (test magnet or remote test station).',
      `Measure again: expect about ${alarmV} V, and check that the unit stops.`,
      'Reset the detector as its instructions say, and check that the reading returns to normal and the unit ' +
        'starts again.',
      'Tell the monitoring company the work is finished, ask for the system to be taken out of test, and have them ' +
        'confirm it shows normal. Record the readings.',
    ],
  }
}

type Reading = 'present' | 'absent' | 'between' | 'line' | 'unknown'

function classify(volts: number | undefined): Reading {
  if (volts === undefined || !Number.isFinite(volts)) return 'unknown'
  const v = Math.abs(volts)
  if (v > LINE_MIN_VOLTS) return 'line'
  if (v >= PRESENT_MIN_VOLTS) return 'present'
  if (v <= ABSENT_MAX_VOLTS) return 'absent'
  return 'between'
}

const voltsOn = (v: 24 | 0): Reading => (v === 24 ? 'present' : 'absent')

const isOnOff = (r: Reading) => r === 'present' || r === 'absent'

const BYPASSED = 'the input is jumpered or fed directly, bypassing the auxiliary contact'

/** Reads a commissioning or test measurement against the plan for the unit's input style. */
export function diagnoseInterlock({ style, measured }: InterlockMeasurement): InterlockDiagnosis {
  const plan = interlockPlan(style)
  const other = interlockPlan(OTHER[style])
  const breaks = style === 'break-to-stop'
  const input = INPUT[style]
  const findings: InterlockFinding[] = []
  const add = (code: InterlockFindingCode, message: string) => findings.push({ code, message })
  const stopped = measured.unitStopped
  const notTripped = measured.detectorTripped === false

  // Line voltage comes first: it is a hazard before it is a wiring fault, and nothing else is judged on it.
  const lineAt = (['normal', 'alarm'] as const).filter((s) => classify(s === 'normal' ? measured.normalVolts : measured.alarmVolts) === 'line')
  if (lineAt.length > 0) {
    const shown = lineAt.map((s) => `${s} ${s === 'normal' ? measured.normalVolts : measured.alarmVolts} V`).join(', ')
    add(
      'line-voltage',
      `The ${input} reads ${shown}: more than a 24 VAC control circuit carries (a Class 2 circuit is at most ` +
        `${CLASS2_MAX_VOLTS} V, NEC Chapter 9 Table 11(A)). Line voltage may be on the input or the meter is on the ` +
        'wrong terminals. Stop the test and keep clear; the unit’s wiring is to be checked under licensed practice ' +
        'before anything is reconnected or tested again.',
    )
  }
  const n = lineAt.includes('normal') ? 'unknown' : classify(measured.normalVolts)
  // A detector that did not trip proves nothing in alarm: its alarm reading is set aside.
  const a = lineAt.includes('alarm') || notTripped ? 'unknown' : classify(measured.alarmVolts)
  const normalWrong = isOnOff(n) && n !== voltsOn(plan.expected.normal.volts)
  const alarmWrong = isOnOff(a) && a !== voltsOn(plan.expected.alarm.volts)

  if (notTripped) {
    add(
      'detector-did-not-trip',
      'The detector did not trip, so the unit’s response and the alarm reading say nothing about the interlock. ' +
        'Trip it again the way its instructions say (test magnet or remote test station) and confirm its alarm LED; ' +
        'if it still will not go into alarm, the detector itself needs service (head, power or module).',
    )
  }

  const between = (state: string, volts: number | undefined) =>
    add(
      'unexpected-voltage',
      `${state} reading ${volts} V is between ${ABSENT_MAX_VOLTS} and ${PRESENT_MIN_VOLTS} V: neither on nor off. ` +
        'Check the meter is on AC volts and referenced to the unit’s 24 VAC common, then look for a loose ' +
        'connection, a long run or an overloaded transformer.',
    )
  if (n === 'between') between('Normal', measured.normalVolts)
  if (a === 'between') between('Alarm', measured.alarmVolts)

  // The unit stopped, yet the input never changed: the meter was on another terminal, or something else stopped it.
  const unchanged = () =>
    add(
      'input-did-not-change',
      `The unit stopped, but the ${input} read the same in alarm as in normal (${n === 'present' ? 'about 24 V' : 'about 0 V'}): ` +
        'the reading was probably taken on another terminal, or the unit was stopped by another input. Find the ' +
        `terminal auxiliary ${plan.contact} feeds, measure there, and test again.`,
    )

  if (normalWrong && alarmWrong) {
    // Both readings are the other style's: auxiliary NC and NO swapped, or the unit's style is on record wrongly.
    add(
      'wired-for-other-style',
      `Readings match ${other.style} wiring, not ${style}: the ${input} is fed from auxiliary ${other.contact} ` +
        `instead of ${plan.contact}. ` +
        (stopped === true
          ? `Yet the unit stopped in alarm, so its input is probably ${other.style} and the record is wrong: ` +
            'check the unit’s wiring diagram and correct the record.'
          : `If the unit really is ${style}, it is held stopped while the detector is normal and starts in alarm: ` +
            `confirm from the unit’s wiring diagram, then move the wire to auxiliary ${plan.contact} and test again.`),
    )
  } else if (n === 'absent' && a === 'absent') {
    if (!breaks && stopped === true) unchanged()
    else
      add(
        'no-source',
        `No 24 V at the ${input} in either state: ${plan.wiring[0].from} is not reaching auxiliary C, or the wire ` +
          `from auxiliary ${plan.contact} is open` +
          (breaks ? '. ' : ', or the detector did not trip (confirm its alarm LED). ') +
          'Check the source at the unit first.',
      )
  } else if (n === 'present' && a === 'present') {
    if (!breaks) add('stuck-stopped', `24 V is on the ${input} even with the detector normal, so the unit cannot run: ${BYPASSED}.`)
    else if (stopped === true) unchanged()
    else add('unit-did-not-stop', `24 V stayed on the ${input} in alarm: the detector did not trip (confirm its alarm LED), or ${BYPASSED}.`)
  } else if (normalWrong) {
    // Only the normal reading is known, or the alarm reading is off the scale: say what it already shows.
    if (breaks) {
      add(
        'no-source',
        `No 24 V at the ${input} with the detector normal, so the unit cannot run: no source at auxiliary C, ` +
          'or the input is wired to NO. Measure in alarm too.',
      )
    } else {
      add(
        'stuck-stopped',
        `24 V is on the ${input} with the detector normal, so the unit is held stopped: the input may be wired ` +
          'to NC, or bypass the auxiliary contact. Measure in alarm too.',
      )
    }
  } else if (alarmWrong) {
    if (stopped === true) unchanged()
    else if (breaks) {
      add(
        'unit-did-not-stop',
        `24 V stayed on the ${input} in alarm: the detector did not trip (confirm its alarm LED), the input is wired ` +
          'to NO, or it bypasses the auxiliary contact. Measure with the detector normal too.',
      )
    } else {
      add(
        'no-source',
        `No 24 V reached the ${input} in alarm: the detector did not trip (confirm its alarm LED), there is no ` +
          'source at auxiliary C, or the input is wired to NC. Measure with the detector normal too.',
      )
    }
  }

  // Only a unit seen running while the detector was in alarm "did not stop"; one that stopped never does.
  if (stopped === false && !notTripped && !findings.some((f) => f.code === 'unit-did-not-stop')) {
    const readingsRight = n === voltsOn(plan.expected.normal.volts) && a === voltsOn(plan.expected.alarm.volts)
    add(
      'unit-did-not-stop',
      readingsRight
        ? `The ${input} changed as expected but the unit kept running: the wire may be on the wrong terminal, or ` +
            'the unit’s controls are not set to act on that input. Check the unit’s wiring diagram and setup.'
        : 'The unit kept running when the detector was tripped.',
    )
  }

  if (findings.length > 0) return { verdict: 'fail', findings }
  const complete = n !== 'unknown' && a !== 'unknown' && stopped !== undefined
  return { verdict: complete ? 'pass' : 'incomplete', findings }
}
