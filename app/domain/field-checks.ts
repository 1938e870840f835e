// Checks on what a technician records for one detector at a visit, beyond the loop and the interlock:
// the remote test station, operated at each functional test where one is fitted, and a module with two
// sensing heads, tested and cleaned head by head. The phone form shows these as they are typed; the
// server refuses an entry that leaves one out. Both read this module, so the two never disagree.
import type { TEST_STATIONS, VisitTask } from './vocabulary'

type TestStation = (typeof TEST_STATIONS)[number]

export type FieldCheckCode = 'station-not-checked' | 'station-not-wired' | 'station-no-reset' | 'head-not-tested' | 'head-did-not-trip' | 'head-not-cleaned'

export interface FieldCheck {
  code: FieldCheckCode
  /** The entry field the check is about, for showing it beside its box. */
  field: string
  message: string
  /** A missing record (the entry cannot be saved), rather than a fault found. */
  missing?: true
}

/** One sensing head's results, numbered as on the module (1 or 2). */
export interface HeadResult {
  head: number
  /** The head put the module into alarm when tested. */
  tripped?: boolean
  /** The head (and its tube filter) was cleaned. */
  cleaned?: boolean
}

export interface FieldCheckInput {
  testStation: TestStation
  headsFitted: number
  /** Not tested at this visit: nothing is required. */
  notTested: boolean
  /** The functional test's results were recorded (signal at the panel, shutdown, reset). */
  functionalRecorded: boolean
  /** Whether the detector was cleaned, as answered for the module as a whole. */
  cleaned?: boolean
  /** The station tripped the detector. */
  testStationWorked?: boolean
  /** The station reset the detector afterwards. */
  testStationReset?: boolean
  /** Per head, where the module has more than one. */
  heads?: readonly HeadResult[]
}

// Where a remote test station is fitted it is operated at each functional test; a station that does
// not trip or reset the detector is a finding (common practice).
/** The tasks a detector's entry writes results for: a fitted station operated with the functional test is a result of its own. */
export function tasksWithStation(tasks: readonly VisitTask[], station: TestStation, stationOperated: boolean): VisitTask[] {
  return station !== 'none' && stationOperated && tasks.includes('functional') && !tasks.includes('test-station') ? [...tasks, 'test-station'] : [...tasks]
}

const DEVICE = 'Follow the device’s instructions.'

export function fieldChecks(i: FieldCheckInput): FieldCheck[] {
  if (i.notTested) return []
  const out: FieldCheck[] = []
  if (i.testStation !== 'none' && i.functionalRecorded) {
    const kind = i.testStation === 'key' ? 'key' : 'magnet'
    if (i.testStationWorked === undefined) {
      out.push({
        code: 'station-not-checked',
        field: 'testStationWorked',
        missing: true,
        message: `Operate the remote test station (${kind}) with the functional test and record whether it tripped the detector.`,
      })
    } else if (i.testStationWorked === false) {
      out.push({
        code: 'station-not-wired',
        field: 'testStationWorked',
        message:
          'Station not wired: the remote test station did not trip the detector. It is most likely not connected to the module’s test ' +
          'terminals (or the wire is broken or on the wrong terminals). Confirm the detector trips at the module itself, then have the ' +
          `station’s wiring put right. ${DEVICE}`,
      })
    } else if (i.testStationReset === false) {
      out.push({
        code: 'station-no-reset',
        field: 'testStationReset',
        message: `The remote test station tripped the detector but did not reset it: check the station’s reset wiring to the module. ${DEVICE}`,
      })
    }
  }
  if (i.headsFitted >= 2) {
    const heads = Array.from({ length: i.headsFitted }, (_, n) => i.heads?.find((h) => h.head === n + 1) ?? { head: n + 1 })
    for (const h of heads) {
      if (i.functionalRecorded) {
        if (h.tripped === undefined) out.push({ code: 'head-not-tested', field: `heads.${h.head}.tripped`, missing: true, message: `Test head ${h.head} on its own and record whether it put the module into alarm.` })
        else if (h.tripped === false)
          out.push({ code: 'head-did-not-trip', field: `heads.${h.head}.tripped`, message: `Head ${h.head} did not put the module into alarm: clean or replace that head and test it again. ${DEVICE}` })
      }
      if (i.cleaned !== undefined) {
        if (h.cleaned === undefined) out.push({ code: 'head-not-cleaned', field: `heads.${h.head}.cleaned`, missing: true, message: `Record whether head ${h.head} was cleaned.` })
      }
    }
  }
  return out
}

/** A cleaning counts only when every head was cleaned (the single "cleaned" answer on a one-head module). */
export function cleanedAll(entry: { cleaned?: boolean; heads?: readonly HeadResult[] }, headsFitted: number): boolean | undefined {
  if (headsFitted < 2 || !entry.heads?.length) return entry.cleaned
  const answers = Array.from({ length: headsFitted }, (_, n) => entry.heads?.find((h) => h.head === n + 1)?.cleaned)
  if (answers.some((a) => a === false)) return false
  return answers.every((a) => a === true) ? true : entry.cleaned
}

/** What stops an entry being saved: a check left out, or a fault found on an entry marked as passed. */
export function entryRefusals(checks: readonly FieldCheck[], result: 'pass' | 'fail' | 'not-tested'): string[] {
  return checks
    .filter((c) => c.missing || result === 'pass')
    .map((c) => (c.missing ? c.message : `Marked as passed, but: ${c.message} Record the detector as failed, with the reason.`))
}
