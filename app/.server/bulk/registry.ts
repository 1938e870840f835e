import type { BulkAction } from './action'
import { cleaningCycle } from './actions/cleaning-cycle'
import { delayAudit } from './actions/delay-audit'
import { acknowledge, assign, setState, unacknowledge } from './actions/detectors'
import { note } from './actions/note'
import { reschedule } from './actions/reschedule'

// Every bulk action, by its URL name. A new action is one module under actions/ and one line here.
const ACTIONS: ReadonlyArray<BulkAction<unknown>> = [reschedule, setState, assign, acknowledge, unacknowledge, note, delayAudit, cleaningCycle]

/** The action of that name, or null. */
export function bulkAction(name: string): BulkAction<unknown> | null {
  return ACTIONS.find((a) => a.name === name) ?? null
}
