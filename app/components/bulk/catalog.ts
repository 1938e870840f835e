import type { Capability } from '~/domain/permissions'

/** The lists that offer bulk actions on their selection. */
export type BulkList = 'visits' | 'detectors' | 'sites' | 'customers' | 'events'
/** Lists whose rows stand for detectors: their selection is sent with `list` and resolved on the server. */
export type ThroughList = 'sites' | 'customers' | 'events'

/**
 * A bulk action as the console offers it; the server's registry holds the same names, capabilities
 * and lists (a test keeps them in step).
 */
export interface BulkActionInfo {
  name: string
  title: string
  entity: 'visit' | 'detector'
  capability: Capability
  /** Other lists whose selection it acts on, through their detectors. */
  through: readonly ThroughList[]
}

const OWNERS: readonly ThroughList[] = ['sites', 'customers']
const ANY: readonly ThroughList[] = ['sites', 'customers', 'events']

export const BULK_ACTIONS: readonly BulkActionInfo[] = [
  { name: 'reschedule', title: 'Reschedule', entity: 'visit', capability: 'schedule:visits', through: [] },
  { name: 'note', title: 'Add a note', entity: 'visit', capability: 'schedule:visits', through: [] },
  { name: 'set-state', title: 'Set state', entity: 'detector', capability: 'edit:records', through: OWNERS },
  { name: 'assign', title: 'Assign', entity: 'detector', capability: 'triage:fleet', through: ANY },
  { name: 'acknowledge', title: 'Acknowledge', entity: 'detector', capability: 'triage:fleet', through: ANY },
  { name: 'unacknowledge', title: 'Unacknowledge', entity: 'detector', capability: 'triage:fleet', through: OWNERS },
  { name: 'delay-audit', title: 'Delay audit', entity: 'detector', capability: 'schedule:visits', through: OWNERS },
  { name: 'cleaning-cycle', title: 'Cleaning cycle', entity: 'detector', capability: 'schedule:visits', through: OWNERS },
]

/** The actions a list offers on its selection. */
export function actionsFor(list: BulkList): BulkActionInfo[] {
  if (list === 'visits') return BULK_ACTIONS.filter((a) => a.entity === 'visit')
  if (list === 'detectors') return BULK_ACTIONS.filter((a) => a.entity === 'detector')
  return BULK_ACTIONS.filter((a) => a.through.includes(list))
}

/** What a bulk request works on: rows picked by id, or all a list's filter matches; `list` when picked on sites, customers or events. */
export type BulkScope = ({ ids: number[] } | { filter: string }) & { list?: ThroughList }

/** The answers of POST /api/bulk/:action (see app/.server/bulk/runner.ts). */
export interface PreviewAnswer {
  selected: number
  /** A selection made on another list: how many of its rows, standing for how many detectors. */
  through?: { list: ThroughList; records: number; detectors: number; withoutDetector?: number }
  summary: string
  changeCount: number
  refusedCount: number
  changes: Array<{ entity: 'visit' | 'detector'; id: number; label: string; from: Record<string, unknown>; to: Record<string, unknown>; create?: unknown }>
  refused: Array<{ id: number; label: string; reason: string }>
  extra?: {
    dayLoads?: DayLoad[]
    /** set-state: the line each detector's history gets. */
    history?: string
    /** delay-audit: the selection's outcomes and the cautions past the NFPA 72 limit. */
    audit?: { agree: number; disagree: number; unknown: number }
    cautions?: string[]
    /** cleaning-cycle: detectors of the selection not due by then. */
    notDue?: number
    dueBy?: string
  }
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
