import type { Capability } from '~/domain/permissions'

/** A bulk action as the console offers it; the server's registry holds the same names and capabilities (a test keeps them in step). */
export interface BulkActionInfo {
  name: string
  title: string
  entity: 'visit' | 'detector'
  capability: Capability
}

export const BULK_ACTIONS: readonly BulkActionInfo[] = [
  { name: 'reschedule', title: 'Reschedule', entity: 'visit', capability: 'schedule:visits' },
  { name: 'note', title: 'Add a note', entity: 'visit', capability: 'schedule:visits' },
  { name: 'set-state', title: 'Set state', entity: 'detector', capability: 'edit:records' },
  { name: 'assign', title: 'Assign', entity: 'detector', capability: 'triage:fleet' },
  { name: 'acknowledge', title: 'Acknowledge', entity: 'detector', capability: 'triage:fleet' },
  { name: 'unacknowledge', title: 'Unacknowledge', entity: 'detector', capability: 'triage:fleet' },
]

/** What a bulk request works on: rows picked by id, or all a list's filter matches. */
export type BulkScope = { ids: number[] } | { filter: string }

/** The answers of POST /api/bulk/:action (see app/.server/bulk/runner.ts). */
export interface PreviewAnswer {
  selected: number
  summary: string
  changeCount: number
  refusedCount: number
  changes: Array<{ id: number; label: string; from: Record<string, unknown>; to: Record<string, unknown> }>
  refused: Array<{ id: number; label: string; reason: string }>
  extra?: { dayLoads?: DayLoad[] }
  previewId: string
}
export interface DayLoad {
  technicianId: number
  technician: string
  date: string
  before: number
  after: number
  capacity: number | null
  unit: string
}
export interface ApplyAnswer {
  changeId: number | null
  applied: number
  refusedCount: number
  refused: Array<{ id: number; label: string; reason: string }>
  summary: string
}
