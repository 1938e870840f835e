import { z } from 'zod'
import { addDays } from '~/domain/dates'
import { planCycle, type CycleDetector, type PlannedVisit } from '~/domain/planner'
import { OPEN_VISIT_STATUSES } from '~/domain/vocabulary'
import type { Db } from '../../db'
import { idParam, isoDate } from '../../list-query'
import { BulkError, defineAction, type BulkChange, type BulkRefusal } from '../action'
import { bookedVisits, covers, regionsOf, weight } from '../capacity'
import { createChange } from '../creates'

const input = z
  .object({
    from: isoDate,
    to: isoDate,
    /** Cleaning due on or before this day; by default 60 days on from today. */
    dueBy: isoDate.optional(),
    technicianIds: z.array(idParam).min(1, 'Choose at least one technician').max(200),
    /** Proposed visits taken out, by key (site|day|technician). */
    remove: z.array(z.string().max(60)).max(5_000).optional(),
    /** Proposed visits given another technician or day. */
    moves: z.array(z.object({ key: z.string().max(60), technicianId: idParam, date: isoDate })).max(5_000).optional(),
  })
  .refine((i) => i.from <= i.to, { message: 'The range must start on or before its end', path: ['to'] })
  .refine((i) => i.to <= addDays(i.from, 183), { message: 'Plan at most six months at once', path: ['to'] })

interface Candidate {
  id: number
  tag: string
  siteId: number
  site: string
  region: string
  nextCleaningOn: string
}

interface Tech {
  id: number
  name: string
  regions: string[] | undefined
  dailyCapacity: number | null
  capacityUnit: 'detectors' | 'visits'
}

/** One proposed visit as the page shows it (the plan grid reads this type). */
export interface CycleVisit {
  key: string
  siteId: number
  site: string
  region: string
  date: string
  technicianId: number
  detectors: number
  moved?: boolean
}

const CHUNK = 5_000
const plural = (n: number, word: string) => `${n} ${word}${n === 1 ? '' : 's'}`
const keyOf = (v: { siteId: number; date: string; technicianId: number }) => `${v.siteId}|${v.date}|${v.technicianId}`

function candidates(db: Db, ids: readonly number[], dueBy: string): { due: Candidate[]; notDue: number } {
  const due: Candidate[] = []
  let notDue = 0
  for (let i = 0; i < ids.length; i += CHUNK) {
    const chunk = ids.slice(i, i + CHUNK)
    const marks = chunk.map(() => '?').join(',')
    // Raw SQL: the due detectors with their site, and a count of the rest, per chunk of the selection.
    due.push(
      ...(db.$client
        .prepare(
          `select d.id, d.tag, d.site_id as siteId, s.name as site, s.region, d.next_cleaning_on as nextCleaningOn
             from detectors d join sites s on s.id = d.site_id
            where d.id in (${marks}) and d.next_cleaning_on is not null and d.next_cleaning_on <= ? order by d.id`,
        )
        .all(...chunk, dueBy) as Candidate[]),
    )
    notDue += (db.$client.prepare(`select count(*) as n from detectors where id in (${marks}) and (next_cleaning_on is null or next_cleaning_on > ?)`).get(...chunk, dueBy) as { n: number }).n
  }
  return { due, notDue }
}

/** Detectors already on an open visit that cleans them. */
function alreadyBooked(db: Db, ids: readonly number[]): Map<number, { visitId: number; on: string }> {
  const out = new Map<number, { visitId: number; on: string }>()
  for (let i = 0; i < ids.length; i += CHUNK) {
    const chunk = ids.slice(i, i + CHUNK)
    const rows = db.$client
      .prepare(
        `select vd.detector_id as detectorId, v.id as visitId, v.scheduled_on as "on" from visit_detectors vd join visits v on v.id = vd.visit_id
          where vd.detector_id in (${chunk.map(() => '?').join(',')}) and v.status in (${OPEN_VISIT_STATUSES.map(() => '?').join(',')})
            and (',' || vd.tasks || ',') like '%,cleaning,%'`,
      )
      .all(...chunk, ...OPEN_VISIT_STATUSES) as Array<{ detectorId: number; visitId: number; on: string }>
    for (const r of rows) out.set(r.detectorId, r)
  }
  return out
}

function loadTechnicians(db: Db, ids: readonly number[]): Tech[] {
  const rows = db.$client
    .prepare(
      `select id, name, role, active, regions, daily_capacity as dailyCapacity, capacity_unit as capacityUnit from users where id in (${ids.map(() => '?').join(',')}) order by name`,
    )
    .all(...ids) as Array<Tech & { role: string; active: number; regions: string | null }>
  const bad = ids.filter((id) => !rows.some((r) => r.id === id && r.role === 'technician' && r.active))
  if (bad.length) throw new BulkError(400, `Not active technicians: ${bad.join(', ')}`)
  return rows.map((r) => ({
    id: r.id,
    name: r.name,
    regions: regionsOf(r.regions),
    dailyCapacity: r.dailyCapacity,
    capacityUnit: r.capacityUnit,
  }))
}

/**
 * A cleaning cycle: the selected detectors whose cleaning falls due by `dueBy`, planned by the
 * engine over the working days of the range (one visit per site per day, most overdue first, each
 * technician within their regions and daily capacity after the work they already have), then the
 * hand changes (a visit removed, or moved to another technician or day within the same rules).
 * Applying books every visit (kind 'cleaning', each detector's task 'cleaning') in one transaction.
 */
export const cleaningCycle = defineAction({
  name: 'cleaning-cycle',
  title: 'Cleaning cycle',
  entity: 'detector',
  // A selection of sites or customers stands for their detectors.
  through: ['sites', 'customers'],
  capability: 'schedule:visits',
  input,
  preview(db, ids, i, ctx) {
    if (i.from < ctx.today) throw new BulkError(400, `Start today (${ctx.today}) or later`)
    const dueBy = i.dueBy ?? addDays(ctx.today, 60)
    const techs = loadTechnicians(db, [...new Set(i.technicianIds)])
    const techById = new Map(techs.map((t) => [t.id, t]))
    const { due, notDue } = candidates(db, ids, dueBy)
    const booked = alreadyBooked(db, due.map((d) => d.id))
    const refused: BulkRefusal[] = []
    const byId = new Map(due.map((d) => [d.id, d]))
    const label = (d: Candidate) => `${d.tag} · ${d.site}`
    for (const d of due) {
      const b = booked.get(d.id)
      if (b) refused.push({ id: d.id, label: label(d), reason: `Already on open visit ${b.visitId} (${b.on}) for cleaning` })
    }
    const toPlan: CycleDetector[] = due.filter((d) => !booked.has(d.id)).map((d) => ({ id: d.id, siteId: d.siteId, region: d.region, dueOn: d.nextCleaningOn }))

    const existing = bookedVisits(db, techs.map((t) => t.id), i.from).filter((b) => b.scheduledOn <= i.to)
    const unitOf = (t: Tech) => ({ ...t, active: true, role: 'technician' })
    const bookedLoad = existing.map((b) => ({ technicianId: b.technicianId, date: b.scheduledOn, amount: weight(unitOf(techById.get(b.technicianId)!), b.detectorCount) }))
    const calendars = (region: string) => ctx.calendar.forRegion(region)
    const plan = planCycle({
      detectors: toPlan,
      from: i.from,
      to: i.to,
      // No daily capacity set: no limit, as everywhere in bulk changes.
      technicians: techs.map((t) => ({ id: t.id, dailyCapacity: t.dailyCapacity ?? Number.MAX_SAFE_INTEGER, capacityUnit: t.capacityUnit, regions: t.regions })),
      booked: bookedLoad,
      calendars,
    })
    const unplaced = plan.unplaced.map((u) => ({ detectorId: u.detectorId, reason: u.reason }))

    // Hand changes, checked against the same rules; a change that breaks one is reported and not made.
    const visits: Array<PlannedVisit & { moved?: boolean }> = [...plan.visits]
    const notes: string[] = []
    let kept = visits
    const loadOf = (techId: number, date: string, without?: PlannedVisit) => {
      const t = techById.get(techId)!
      const w = (n: number) => (t.capacityUnit === 'visits' ? 1 : n)
      return (
        bookedLoad.filter((b) => b.technicianId === techId && b.date === date).reduce((n, b) => n + b.amount, 0) +
        kept.filter((v) => v !== without && v.technicianId === techId && v.date === date).reduce((n, v) => n + w(v.detectorIds.length), 0)
      )
    }
    for (const m of i.moves ?? []) {
      const v = kept.find((x) => keyOf(x) === m.key)
      if (!v) {
        notes.push(`No proposed visit ${m.key} to move; preview again`)
        continue
      }
      const t = techById.get(m.technicianId)
      const region = byId.get(v.detectorIds[0])!.region
      const site = byId.get(v.detectorIds[0])!.site
      const why = !t
        ? 'that technician is not in this cycle'
        : !covers(t, region)
          ? `${t.name} does not cover ${region}`
          : m.date < i.from || m.date > i.to
            ? `${m.date} is outside the range`
            : (ctx.calendar.dayOff(region, m.date) ?? (kept.some((x) => x !== v && x.siteId === v.siteId && x.date === m.date) ? 'the site already has a visit that day' : null))
      if (why) {
        notes.push(`${site}: not moved, ${why}`)
        continue
      }
      const need = t!.capacityUnit === 'visits' ? 1 : v.detectorIds.length
      const cap = t!.dailyCapacity ?? Infinity
      if (loadOf(t!.id, m.date, v) + need > cap) {
        notes.push(`${site}: not moved, ${t!.name} has no room on ${m.date} (${cap} ${t!.capacityUnit} a day)`)
        continue
      }
      const next = { ...v, technicianId: t!.id, date: m.date, moved: true }
      kept = kept.map((x) => (x === v ? next : x))
    }

    // Taken out after the moves, so a visit moved and then removed goes by its new key.
    const removed = new Set(i.remove ?? [])
    for (const v of kept.filter((v) => removed.has(keyOf(v)))) {
      for (const d of v.detectorIds) unplaced.push({ detectorId: d, reason: 'Taken out of the plan by hand' })
    }
    kept = kept.filter((v) => !removed.has(keyOf(v)))

    const cycleVisits: CycleVisit[] = kept.map((v) => {
      const d = byId.get(v.detectorIds[0])!
      return { key: keyOf(v), siteId: v.siteId, site: d.site, region: d.region, date: v.date, technicianId: v.technicianId, detectors: v.detectorIds.length, ...(v.moved ? { moved: true } : {}) }
    })
    const changes: BulkChange[] = kept
      .map((v) => {
        const d = byId.get(v.detectorIds[0])!
        const who = techById.get(v.technicianId)!.name
        return createChange(
          `${d.site} · ${v.date} · ${who}`,
          {
            siteId: v.siteId,
            kind: 'cleaning',
            scheduledOn: v.date,
            technicianId: v.technicianId,
            notes: 'Cleaning cycle. Notify the monitoring company and site management and have the system placed in test before any work; clean heads and tubes per the device instructions.',
            detectors: v.detectorIds.map((detectorId) => ({ detectorId, tasks: ['cleaning'] })),
          },
          { site: d.site, scheduledOn: v.date, technician: who, detectors: v.detectorIds.length },
        )
      })
      .sort((a, b) => String(a.to.scheduledOn).localeCompare(String(b.to.scheduledOn)) || a.label.localeCompare(b.label))
    for (const u of unplaced) {
      const d = byId.get(u.detectorId)!
      refused.push({ id: d.id, label: label(d), reason: u.reason })
    }
    const placed = kept.reduce((n, v) => n + v.detectorIds.length, 0)
    return {
      changes,
      refused,
      summary: `Book ${plural(changes.length, 'cleaning visit')} for ${plural(placed, 'detector')} due by ${dueBy}, ${i.from} to ${i.to}`,
      extra: {
        dueBy,
        notDue,
        technicians: techs.map((t) => ({ id: t.id, name: t.name, regions: t.regions ?? null, dailyCapacity: t.dailyCapacity, capacityUnit: t.capacityUnit })),
        visits: cycleVisits,
        days: [...new Set(cycleVisits.map((v) => v.date))].sort(),
        load: Object.fromEntries(
          [...new Set(kept.map((v) => `${v.technicianId}|${v.date}`))].map((k) => {
            const [t, date] = k.split('|')
            return [k, loadOf(Number(t), date)]
          }),
        ),
        notes,
      },
    }
  },
})

