import { cleanedAll } from '~/domain/field-checks'
import type { DetectorEntry } from '~/domain/visit-forms'
import type { VisitTask } from '~/domain/vocabulary'

export type Findings = Omit<DetectorEntry, 'detectorId' | 'notes' | 'result' | 'reason'>

/** What the visit form keeps per detector beyond its notes, result and reason. */
export function findingsOf(entry: DetectorEntry): Findings {
  const { detectorId: _id, notes: _notes, result: _result, reason: _reason, ...findings } = entry
  return findings
}

/** An entry saved earlier (by the record intent) read back from its visit_detectors row. */
export function entryFromRow(row: { detectorId: number; result: string; resultReason: string | null; notes: string | null; findings: string | null }): DetectorEntry | null {
  if (row.result === 'pending') return null
  const findings = row.findings ? (JSON.parse(row.findings) as Findings) : {}
  return {
    ...findings,
    detectorId: row.detectorId,
    result: row.result === 'skipped' ? 'not-tested' : (row.result as 'pass' | 'fail'),
    ...(row.resultReason ? { reason: row.resultReason } : {}),
    ...(row.notes ? { notes: row.notes } : {}),
  }
}

const TEST_TASKS: readonly VisitTask[] = ['functional', 'sensitivity', 'shutdown', 'test-station']

export interface TaskOutcome {
  task: VisitTask
  outcome: 'pass' | 'fail'
  value: number | null
}

/**
 * The history a detector's entry writes for the tasks the visit covered. A pass passes every task
 * done. A fail fails the tests whose findings show it (no alarm at the panel, the unit not shut down,
 * no reset, a test station that did not work); when none does, the technician's judgement fails the
 * first test covered, so a failed detector always carries a failed task. A cleaning not done, and
 * every task of a detector not tested, write nothing.
 */
export function taskOutcomes(tasks: readonly VisitTask[], entry: DetectorEntry, headsFitted = 1): TaskOutcome[] {
  if (entry.result === 'not-tested') return []
  const f = entry.functional
  // On a two-head module the cleaning counts only when every head was cleaned.
  const worked = tasks.filter((t) => !(t === 'cleaning' && cleanedAll(entry, headsFitted) === false))
  // A failed detector whose only task was a cleaning not done still needs its failure on record.
  const done = worked.length || entry.result === 'pass' ? worked : tasks.slice(0, 1)
  const failing = new Set<VisitTask>()
  if (entry.result === 'fail') {
    if (f && (f.signalAtPanel !== 'alarm' || !f.unitShutDown || !f.resetOk || f.detectorTripped === false)) failing.add('functional')
    if (entry.heads?.some((h) => h.tripped === false)) failing.add('functional')
    if (f && !f.unitShutDown) failing.add('shutdown')
    if (entry.testStationWorked === false || entry.testStationReset === false) failing.add('test-station')
    if (!done.some((t) => failing.has(t))) {
      const blamed = TEST_TASKS.find((t) => done.includes(t)) ?? done.find((t) => t !== 'cleaning') ?? done[0]
      if (blamed) failing.add(blamed)
    }
  }
  return done.map((task) => ({
    task,
    outcome: failing.has(task) ? 'fail' : 'pass',
    value: task === 'sensitivity' ? (entry.sensitivityPctFt ?? null) : null,
  }))
}

const TASK_WORDS: Record<VisitTask, string> = {
  visual: 'visual inspection',
  functional: 'functional test',
  sensitivity: 'sensitivity test',
  cleaning: 'cleaning',
  shutdown: 'unit shutdown check',
  'test-station': 'test station check',
}

const listed = (words: string[]) => (words.length > 1 ? `${words.slice(0, -1).join(', ')} and ${words.at(-1)}` : (words[0] ?? 'work'))

/** The event's plain sentence: what was done and how it went, in the technician's words where given. */
export function eventDetail(visitId: number, outcomes: TaskOutcome[], entry: DetectorEntry): string {
  if (entry.result === 'not-tested') return `Not tested at visit ${visitId}: ${entry.reason ?? 'no reason given'}`
  const done = listed(outcomes.map((o) => TASK_WORDS[o.task]))
  const head = `${done[0].toUpperCase()}${done.slice(1)} at visit ${visitId}`
  if (entry.result === 'pass') return `${head}: passed`
  const failed = listed(outcomes.filter((o) => o.outcome === 'fail').map((o) => TASK_WORDS[o.task]))
  return `${head}: failed (${failed}). ${entry.reason ?? ''}`.trim()
}

/** The event kind: a test when any test was done, a cleaning when only cleaning (and looking) was. */
export function eventKind(outcomes: TaskOutcome[]): 'test' | 'cleaning' {
  const tested = outcomes.some((o) => TEST_TASKS.includes(o.task))
  return !tested && outcomes.some((o) => o.task === 'cleaning') ? 'cleaning' : 'test'
}
