import type { Db } from '../db'
import type { Technician } from './actions/rows'

/** One technician's booked work on one day, before and after a change, in the technician's own unit. */
export interface DayLoad {
  technicianId: number
  technician: string
  date: string
  before: number
  after: number
  /** null: no daily limit set. */
  capacity: number | null
  unit: 'detectors' | 'visits'
}

export interface BookedVisit {
  id: number
  technicianId: number
  scheduledOn: string
  detectorCount: number
}

/** Open visits of these technicians from `from` on (what a day already holds). */
export function bookedVisits(db: Db, technicianIds: readonly number[], from: string): BookedVisit[] {
  if (technicianIds.length === 0) return []
  // Raw SQL: the visit with its correlated detector count, read as arrays (objects cost twice as much).
  const rows = db.$client
    .prepare(
      `select v.id, v.technician_id, v.scheduled_on, (select count(*) from visit_detectors vd where vd.visit_id = v.id)
         from visits v
        where v.technician_id in (${technicianIds.map(() => '?').join(',')}) and v.scheduled_on >= ?
          and v.status in ('planned', 'notified', 'in-progress')`,
    )
    .raw(true)
    .all(...technicianIds, from) as Array<[number, number, string, number]>
  return rows.map(([id, technicianId, scheduledOn, detectorCount]) => ({ id, technicianId, scheduledOn, detectorCount }))
}

/** What a visit weighs against its technician's day: its detectors, or 1 when capacity counts visits. */
export const weight = (tech: Technician | undefined, detectorCount: number) => (tech?.capacityUnit === 'visits' ? 1 : detectorCount)

/** A limit for the planner: no daily capacity set means no limit. */
export const limitOf = (tech: Technician | undefined) => (tech?.dailyCapacity == null ? Infinity : tech.dailyCapacity)

/** A technician's `regions` text as the planners read it: ISO 3166-2 codes, or undefined for everywhere. */
export const regionsOf = (text: string | null): string[] | undefined =>
  text?.trim() ? text.split(',').map((x) => x.trim().toUpperCase()).filter(Boolean) : undefined

/** Whether a technician may be sent to a site in `region`: no regions listed means every region. */
export const covers = (tech: { regions?: string[] | undefined }, region: string) => !tech.regions || tech.regions.includes(region.trim().toUpperCase())

export interface FieldTechnician extends Technician {
  regions: string[] | undefined
}

/** Every active technician, by name, with their daily capacity and the regions they cover. */
export function activeTechnicians(db: Db): FieldTechnician[] {
  const rows = db.$client
    .prepare(
      `select id, name, active, role, regions, daily_capacity as dailyCapacity, capacity_unit as capacityUnit
         from users where role = 'technician' and active = 1 order by name, id`,
    )
    .all() as Array<Omit<FieldTechnician, 'regions' | 'active'> & { regions: string | null; active: number }>
  return rows.map((r) => ({ ...r, active: Boolean(r.active), regions: regionsOf(r.regions) }))
}

const MAX_DAY_LOADS = 500

/** A visit changing day or technician. */
export interface Move {
  id: number
  detectorCount: number
  from: { tech: number | null; date: string }
  to: { tech: number | null; date: string }
}

/**
 * Each technician's load on every day a move touches, before and after. `booked` is every open
 * visit (those moving at their old place), `moves` the visits that change day or technician.
 */
export function dayLoads(
  booked: readonly BookedVisit[],
  moves: readonly Move[],
  techs: ReadonlyMap<number, Technician>,
): DayLoad[] {
  const key = (tech: number, date: string) => `${tech}|${date}`
  const before = new Map<string, number>()
  for (const b of booked) before.set(key(b.technicianId, b.scheduledOn), (before.get(key(b.technicianId, b.scheduledOn)) ?? 0) + weight(techs.get(b.technicianId), b.detectorCount))
  const after = new Map(before)
  const touched = new Set<string>()
  for (const m of moves) {
    if (m.from.tech !== null) {
      const k = key(m.from.tech, m.from.date)
      after.set(k, (after.get(k) ?? 0) - weight(techs.get(m.from.tech), m.detectorCount))
      touched.add(k)
    }
    if (m.to.tech !== null) {
      const k = key(m.to.tech, m.to.date)
      after.set(k, (after.get(k) ?? 0) + weight(techs.get(m.to.tech), m.detectorCount))
      touched.add(k)
    }
  }
  return [...touched]
    .map((k) => {
      const [tech, date] = k.split('|')
      const t = techs.get(Number(tech))
      return {
        technicianId: Number(tech),
        technician: t?.name ?? `Technician ${tech}`,
        date,
        before: before.get(k) ?? 0,
        after: after.get(k) ?? 0,
        capacity: t?.dailyCapacity ?? null,
        unit: t?.capacityUnit ?? 'detectors',
      }
    })
    .sort((a, b) => a.technician.localeCompare(b.technician) || a.date.localeCompare(b.date))
    .slice(0, MAX_DAY_LOADS)
}
