import type { Db } from '../../db'

export interface VisitRow {
  id: number
  siteId: number
  site: string
  region: string
  scheduledOn: string
  technicianId: number | null
  status: 'planned' | 'notified' | 'in-progress' | 'done' | 'cancelled'
  notes: string | null
  cancelledAt: string | null
  cancelReason: string | null
  version: number
  detectorCount: number
}

export interface DetectorRow {
  id: number
  tag: string
  site: string
  state: string
  assignedTo: number | null
  acknowledgedAt: string | null
  acknowledgedBy: number | null
  version: number
}

// SQLite binds at most 32,766 values per statement: selections are read in chunks.
const CHUNK = 5_000

function inChunks<T>(ids: readonly number[], read: (chunk: readonly number[], marks: string) => T[]): T[] {
  const out: T[] = []
  for (let i = 0; i < ids.length; i += CHUNK) {
    const chunk = ids.slice(i, i + CHUNK)
    out.push(...read(chunk, chunk.map(() => '?').join(',')))
  }
  return out
}

/** The selected visits with their site, region and detector count, in id order; missing ids are left out. */
export function visitRows(db: Db, ids: readonly number[]): VisitRow[] {
  // Raw SQL: one statement for the row and its correlated detector count, the ids bound as one JSON
  // value. Read as arrays: better-sqlite3 building a dozen-key object per row doubled the read.
  const rows = db.$client
    .prepare(
      `select v.id, v.site_id, s.name, s.region, v.scheduled_on, v.technician_id, v.status, v.notes, v.cancelled_at, v.cancel_reason, v.version,
              (select count(*) from visit_detectors vd where vd.visit_id = v.id)
         from visits v join sites s on s.id = v.site_id where v.id in (select value from json_each(?)) order by v.id`,
    )
    .raw(true)
    .all(JSON.stringify(ids)) as Array<[number, number, string, string, string, number | null, VisitRow['status'], string | null, string | null, string | null, number, number]>
  return rows.map(([id, siteId, site, region, scheduledOn, technicianId, status, notes, cancelledAt, cancelReason, version, detectorCount]) => ({
    id,
    siteId,
    site,
    region,
    scheduledOn,
    technicianId,
    status,
    notes,
    cancelledAt,
    cancelReason,
    version,
    detectorCount,
  }))
}

/** The selected detectors with their site, in id order; missing ids are left out. */
export function detectorRows(db: Db, ids: readonly number[]): DetectorRow[] {
  return inChunks(ids, (chunk, marks) =>
    db.$client
      .prepare(
        `select d.id, d.tag, s.name as site, d.state, d.assigned_to as assignedTo, d.acknowledged_at as acknowledgedAt,
                d.acknowledged_by as acknowledgedBy, d.version
           from detectors d join sites s on s.id = d.site_id where d.id in (${marks}) order by d.id`,
      )
      .all(...chunk) as DetectorRow[],
  )
}

export const visitLabel = (v: Pick<VisitRow, 'id' | 'site' | 'scheduledOn'>) => `Visit ${v.id} · ${v.site} · ${v.scheduledOn}`
export const detectorLabel = (d: Pick<DetectorRow, 'tag' | 'site'>) => `${d.tag} · ${d.site}`

/** Ids asked for that no longer exist, as refusals. */
export function missing(ids: readonly number[], found: ReadonlyArray<{ id: number }>, what: string) {
  const have = new Set(found.map((r) => r.id))
  return ids.filter((id) => !have.has(id)).map((id) => ({ id, label: `${what} ${id}`, reason: 'No longer exists' }))
}

export interface Technician {
  id: number
  name: string
  active: boolean
  role: string
  dailyCapacity: number | null
  capacityUnit: 'detectors' | 'visits'
}

export function technicians(db: Db, ids: readonly number[]): Map<number, Technician> {
  const rows = inChunks(ids, (chunk, marks) =>
    db.$client
      .prepare(`select id, name, active, role, daily_capacity as dailyCapacity, capacity_unit as capacityUnit from users where id in (${marks})`)
      .all(...chunk) as Technician[],
  )
  return new Map(rows.map((t) => [t.id, { ...t, active: Boolean(t.active) }]))
}
