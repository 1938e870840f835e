import { z } from 'zod'
import { shiftVisits, type VisitToShift } from '~/domain/planner'
import type { Db } from '../../db'
import { idParam, isoDate } from '../../list-query'
import { BulkError, defineAction, type BulkChange, type BulkContext, type BulkRefusal } from '../action'
import { bookedVisits, dayLoads, limitOf, weight, type Move } from '../capacity'
import { missing, technicians, visitLabel, visitRows, type Technician, type VisitRow } from './rows'

const input = z.discriminatedUnion('mode', [
  z.object({ mode: z.literal('shift'), days: z.number().int().min(-120).max(120).refine((n) => n !== 0, 'Shift by at least one working day') }),
  z.object({ mode: z.literal('date'), date: isoDate }),
  z.object({ mode: z.literal('technician'), technicianId: idParam }),
  z.object({ mode: z.literal('cancel'), reason: z.string().trim().min(3, 'Give a reason of a few words').max(500) }),
])

const OPEN = ['planned', 'notified', 'in-progress']
const plural = (n: number, word: string) => `${n} ${word}${n === 1 ? '' : 's'}`

/** Moves, reassigns or cancels visits, on the company's working days and within each technician's daily capacity. */
export const reschedule = defineAction({
  name: 'reschedule',
  title: 'Reschedule visits',
  entity: 'visit',
  capability: 'schedule:visits',
  input,
  // A cancellation's plan carries the moment (cancelledAt), so it is always worked out again.
  basis: (db, ids, i, ctx) => (i.mode === 'cancel' ? undefined : planBasis(db, ids, i.mode === 'technician' ? i.technicianId : undefined, ctx)),
  preview(db, ids, i, ctx) {
    const rows = visitRows(db, ids)
    const refused: BulkRefusal[] = missing(ids, rows, 'Visit')
    const refuse = (v: VisitRow, reason: string) => refused.push({ id: v.id, label: visitLabel(v), reason })
    const open: VisitRow[] = []
    for (const v of rows) {
      if (i.mode === 'cancel' ? !['planned', 'notified'].includes(v.status) : !OPEN.includes(v.status)) refuse(v, `The visit is ${v.status}`)
      else open.push(v)
    }
    if (i.mode === 'cancel') {
      const changes = open.map((v) => change(v, { status: v.status, cancelledAt: v.cancelledAt, cancelReason: v.cancelReason }, { status: 'cancelled', cancelledAt: ctx.now, cancelReason: i.reason }))
      return { changes, refused, summary: `Cancel ${plural(changes.length, 'visit')}: ${i.reason}` }
    }

    let newTech: Technician | undefined
    if (i.mode === 'technician') {
      newTech = technicians(db, [i.technicianId]).get(i.technicianId)
      if (!newTech || newTech.role !== 'technician' || !newTech.active) throw new BulkError(400, 'Choose an active technician')
    }
    const techIds = [...new Set([...open.map((v) => v.technicianId), newTech?.id].filter((t): t is number => t != null))]
    const techs = technicians(db, techIds)
    const booked = bookedVisits(db, techIds, ctx.today)
    const moving = new Set(open.map((v) => v.id))
    const changes: BulkChange[] = []
    const moves: Move[] = []

    if (i.mode === 'technician') {
      const t = newTech!
      // The new technician's days as booked without the visits being moved.
      const load = new Map<string, number>()
      for (const b of booked) if (b.technicianId === t.id && !moving.has(b.id)) load.set(b.scheduledOn, (load.get(b.scheduledOn) ?? 0) + weight(t, b.detectorCount))
      for (const v of [...open].sort((a, b) => a.scheduledOn.localeCompare(b.scheduledOn) || a.id - b.id)) {
        if (v.technicianId === t.id) {
          refuse(v, `Already with ${t.name}`)
          continue
        }
        const w = weight(t, v.detectorCount)
        const has = load.get(v.scheduledOn) ?? 0
        if (has + w > limitOf(t)) {
          refuse(v, `${t.name} is full on ${v.scheduledOn}: ${Math.max(0, limitOf(t) - has)} of ${t.dailyCapacity} ${t.capacityUnit} left, the visit needs ${w}`)
          continue
        }
        load.set(v.scheduledOn, has + w)
        changes.push(change(v, { technicianId: v.technicianId }, { technicianId: t.id }))
        moves.push({ id: v.id, detectorCount: v.detectorCount, from: { tech: v.technicianId, date: v.scheduledOn }, to: { tech: t.id, date: v.scheduledOn } })
      }
      changes.sort((a, b) => a.id - b.id)
      return { changes, refused, summary: `Give ${plural(changes.length, 'visit')} to ${t.name}`, extra: { dayLoads: dayLoads(booked, moves, techs) } }
    }

    const toShift: VisitToShift[] = []
    for (const v of open) {
      if (i.mode === 'date') {
        const off = dayOff(ctx, v.region, i.date)
        if (off) {
          refuse(v, `${i.date} is not a working day at ${v.site} (${off})`)
          continue
        }
      }
      const tech = v.technicianId === null ? undefined : techs.get(v.technicianId)
      toShift.push({ id: v.id, siteId: v.siteId, region: v.region, date: v.scheduledOn, technicianId: v.technicianId, detectorCount: weight(tech, v.detectorCount) })
    }
    const capacity = new Map(techIds.map((t) => [t, limitOf(techs.get(t))]))
    const existingLoad = booked
      .filter((b) => !moving.has(b.id))
      .map((b) => ({ technicianId: b.technicianId, date: b.scheduledOn, detectorCount: weight(techs.get(b.technicianId), b.detectorCount) }))
    const shifted = shiftVisits({
      visits: toShift,
      ...(i.mode === 'shift' ? { by: { businessDays: i.days } } : { to: i.date }),
      capacity,
      existingLoad,
      calendars: (region) => ctx.calendar.forRegion(region),
      roll: false,
      earliest: ctx.today,
    })
    const byId = new Map(open.map((v) => [v.id, v]))
    const named = (reason: string) => reason.replace(/[Tt]echnician (\d+)/g, (_, id: string) => techs.get(Number(id))?.name ?? `Technician ${id}`)
    for (const u of shifted.unplaced) refuse(byId.get(u.id)!, named(u.reason))
    for (const m of shifted.moved) {
      const v = byId.get(m.id)!
      if (m.to === m.from) refuse(v, `Already on ${m.to}`)
      else {
        changes.push(change(v, { scheduledOn: m.from }, { scheduledOn: m.to }))
        moves.push({ id: v.id, detectorCount: v.detectorCount, from: { tech: v.technicianId, date: m.from }, to: { tech: v.technicianId, date: m.to } })
      }
    }
    refused.sort((a, b) => a.id - b.id)
    const how = i.mode === 'shift' ? `by ${plural(i.days, 'working day')}` : `to ${i.date}`
    return { changes, refused, summary: `Move ${plural(changes.length, 'visit')} ${how}`, extra: { dayLoads: dayLoads(booked, moves, techs) } }
  },
})

/**
 * What a move's plan is worked out from, condensed: equal strings mean the same plan. Every write to
 * a visit (its detectors included) or a site bumps its version, and versions only grow, so equal
 * counts and version totals over the selection and its sites mean none of those rows changed and
 * their technicians are the same. Those technicians' open visits per day, by their ids and version
 * total (the same ids, so the same versions), stand for the load the planner counts (a grouped sum
 * of detectors read three times slower); with their capacity, the company calendar and the office
 * day that is all the preview reads. (`+status` keeps SQLite on visits_tech_idx, whose order groups
 * the rows without a sort.)
 */
function planBasis(db: Db, ids: readonly number[], newTech: number | undefined, ctx: BulkContext): string {
  const q = db.$client
  const selected = q
    .prepare(
      `select count(*) as n, total(v.version) as visits, total(s.version) as sites, group_concat(distinct v.technician_id) as techs
         from json_each(?) j join visits v on v.id = j.value join sites s on s.id = v.site_id`,
    )
    .get(JSON.stringify(ids)) as { n: number; visits: number; sites: number; techs: string | null }
  const techIds = [...new Set([...(selected.techs?.split(',').map(Number) ?? []), newTech])].filter((t): t is number => t != null).sort((a, b) => a - b)
  const techs = [...technicians(db, techIds).values()].sort((a, b) => a.id - b.id)
  const booked = q
    .prepare(
      `select v.technician_id, v.scheduled_on, group_concat(v.id), total(v.version)
         from visits v
        where v.technician_id in (select value from json_each(?)) and v.scheduled_on >= ? and +v.status in ('planned', 'notified', 'in-progress')
        group by v.technician_id, v.scheduled_on order by v.technician_id, v.scheduled_on`,
    )
    .raw(true)
    .all(JSON.stringify(techIds), ctx.today)
  return JSON.stringify([ctx.today, ctx.calendar.key, selected.n, selected.visits, selected.sites, techs, booked])
}

function change(v: VisitRow, from: BulkChange['from'], to: BulkChange['to']): BulkChange {
  return { entity: 'visit', id: v.id, label: visitLabel(v), from, to, version: v.version }
}

function dayOff(ctx: BulkContext, region: string, date: string): string | null {
  try {
    return ctx.calendar.dayOff(region, date)
  } catch {
    return `unknown holiday region '${region}'`
  }
}
