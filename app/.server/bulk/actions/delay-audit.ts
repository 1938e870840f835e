import { z } from 'zod'
import { addDays } from '~/domain/dates'
import { auditDelay, delayLimitCaution, TROUBLE_REPORTING_SECONDS } from '~/domain/delay-audit'
import { OPEN_VISIT_STATUSES } from '~/domain/vocabulary'
import type { Db } from '../../db'
import { idParam, isoDate } from '../../list-query'
import type { WorkCalendar } from '~/domain/calendar'
import { usualTechnicians } from '../../repos/triage-booking'
import { BulkError, defineAction, type BulkChange, type BulkContext, type BulkRefusal } from '../action'
import { activeTechnicians, bookedVisits, covers, limitOf, weight, type FieldTechnician } from '../capacity'
import { createChange } from '../creates'

const input = z.object({
  do: z.enum(['verify', 'correction-visits'], { error: "Say do: 'verify' or 'correction-visits'" }),
  date: isoDate.optional(),
  technicianId: idParam.optional(),
})

export interface AuditCounts {
  agree: number
  disagree: number
  unknown: number
  /** Sites of the selection whose agreed delay is past what NFPA 72 allows for reporting a trouble. */
  policiesBeyond: number
  /** Detectors of the selection set past that limit. */
  settingsBeyond: number
}

const CHUNK = 5_000
const plural = (n: number, word: string) => `${n} ${word}${n === 1 ? '' : 's'}`

function chunks<T>(ids: readonly number[], read: (chunk: readonly number[], marks: string) => T[]): T[] {
  const out: T[] = []
  for (let i = 0; i < ids.length; i += CHUNK) {
    const chunk = ids.slice(i, i + CHUNK)
    out.push(...read(chunk, chunk.map(() => '?').join(',')))
  }
  return out
}

/** Counts per outcome over the selection, added up in SQL chunk by chunk: the fleet never comes into memory. */
export function countSelection(db: Db, ids: readonly number[]): AuditCounts {
  const counts: AuditCounts = { agree: 0, disagree: 0, unknown: 0, policiesBeyond: 0, settingsBeyond: 0 }
  const sites = new Set<number>()
  chunks(ids, (chunk, marks) => {
    // Raw SQL: count(*) per stored outcome and the settings past the limit, on the detectors' own rows.
    const rows = db.$client
      .prepare(
        `select d.delay_agreement as outcome, count(*) as n, sum(d.delay_seconds > ${TROUBLE_REPORTING_SECONDS}) as beyond
           from detectors d where d.id in (${marks}) group by d.delay_agreement`,
      )
      .all(...chunk) as Array<{ outcome: 'agree' | 'disagree' | 'unknown'; n: number; beyond: number | null }>
    for (const r of rows) {
      counts[r.outcome] += r.n
      counts.settingsBeyond += r.beyond ?? 0
    }
    const far = db.$client
      .prepare(`select distinct s.id from detectors d join sites s on s.id = d.site_id where d.id in (${marks}) and s.delay_policy_seconds > ${TROUBLE_REPORTING_SECONDS}`)
      .all(...chunk) as Array<{ id: number }>
    for (const s of far) sites.add(s.id)
    return []
  })
  counts.policiesBeyond = sites.size
  return counts
}

interface AuditRow {
  id: number
  tag: string
  siteId: number
  site: string
  region: string
  delaySeconds: number | null
  delayObservedOn: string | null
  policySeconds: number
  version: number
}

function auditRows(db: Db, ids: readonly number[], outcome: 'agree' | 'disagree'): AuditRow[] {
  return chunks(ids, (chunk, marks) =>
    db.$client
      .prepare(
        `select d.id, d.tag, d.site_id as siteId, s.name as site, s.region, d.delay_seconds as delaySeconds,
                d.delay_observed_on as delayObservedOn, s.delay_policy_seconds as policySeconds, d.version
           from detectors d join sites s on s.id = d.site_id
          where d.id in (${marks}) and d.delay_agreement = ? order by d.id`,
      )
      .all(...chunk, outcome) as AuditRow[],
  )
}

const setting = (s: number) => (s === 0 ? 'at once' : s % 60 === 0 ? `${s / 60} min` : `${s} s`)

/** What a technician is sent to do about one site's disagreeing detectors, in the visit's notes. */
/** The delay-limit caution once per wording, with the detectors it concerns. */
function cautionLines(rows: readonly AuditRow[]): string[] {
  const byText = new Map<string, string[]>()
  for (const r of rows) {
    const caution = delayLimitCaution(r)
    if (caution) byText.set(caution, [...(byText.get(caution) ?? []), r.tag])
  }
  return [...byText].map(([text, tags]) => `${tags.slice(0, 10).join(', ')}${tags.length > 10 ? ` and ${tags.length - 10} more` : ''}: ${text}`)
}

function correctionNotes(rows: readonly AuditRow[]): string {
  const lines = rows.slice(0, 40).map((r) => `${r.tag}: set ${setting(r.delaySeconds ?? 0)}, agreed ${setting(r.policySeconds)}`)
  if (rows.length > 40) lines.push(`and ${rows.length - 40} more`)
  return [
    'Delay setting correction. Notify the monitoring company and site management first.',
    "Check each module's delay setting per the device's instructions and coordinate any change with the monitoring company; re-test and record the setting as found and as left.",
    'HVAC staff never alter the fire alarm panel.',
    ...cautionLines(rows),
    ...lines,
  ].join('\n')
}

function verify(db: Db, ids: readonly number[], ctx: BulkContext, counts: AuditCounts) {
  const changes: BulkChange[] = []
  const refused: BulkRefusal[] = []
  for (const r of auditRows(db, ids, 'agree')) {
    const label = `${r.tag} · ${r.site}`
    if (r.delaySeconds === null) continue
    if (r.delayObservedOn === ctx.today) refused.push({ id: r.id, label, reason: `Already verified on ${ctx.today}` })
    // The derivation reads the setting and the policy, not the day it was seen: no stored fact moves
    // (the delay-audit test re-derives the whole fleet after a verify to hold that true).
    else changes.push({ entity: 'detector', id: r.id, label, from: { delayObservedOn: r.delayObservedOn }, to: { delayObservedOn: ctx.today }, version: r.version, keepsFacts: true })
  }
  const left = counts.disagree + counts.unknown
  const summary = `Mark ${plural(changes.length, 'agreeing delay setting')} verified on ${ctx.today}${left ? `; ${left} that disagree or were never recorded are left out` : ''}`
  return { changes, refused, summary }
}

// Above this many detectors, the open visits are read from the visits' side (the open ones are few,
// on visits_status_day_idx) and matched in memory: one seek per detector into its whole visit
// history cost seconds at fleet scale.
const FROM_VISITS_ABOVE = 500

/** The open visit holding a functional test for each of these detectors that has one. */
export function openFunctionalVisits(db: Db, detectorIds: readonly number[], fromVisitsAbove = FROM_VISITS_ABOVE): Map<number, { visitId: number; on: string }> {
  const statuses = OPEN_VISIT_STATUSES.map(() => '?').join(',')
  const functional = `(',' || vd.tasks || ',') like '%,functional,%'`
  const rows =
    detectorIds.length > fromVisitsAbove
      ? (db.$client
          .prepare(`select vd.detector_id as detectorId, v.id as visitId, v.scheduled_on as "on" from visits v join visit_detectors vd on vd.visit_id = v.id where v.status in (${statuses}) and ${functional} order by v.id`)
          .all(...OPEN_VISIT_STATUSES) as Array<{ detectorId: number; visitId: number; on: string }>)
      : chunks(detectorIds, (chunk, marks) =>
          db.$client
            .prepare(
              `select vd.detector_id as detectorId, v.id as visitId, v.scheduled_on as "on" from visit_detectors vd join visits v on v.id = vd.visit_id
                where vd.detector_id in (${marks}) and v.status in (${statuses}) and ${functional} order by v.id`,
            )
            .all(...chunk, ...OPEN_VISIT_STATUSES) as Array<{ detectorId: number; visitId: number; on: string }>,
        )
  const wanted = new Set(detectorIds)
  const out = new Map<number, { visitId: number; on: string }>()
  // Ordered by visit id within SQLite's walk; the first open visit found per detector is named.
  for (const r of rows) if (wanted.has(r.detectorId) && !out.has(r.detectorId)) out.set(r.detectorId, { visitId: r.visitId, on: r.on })
  return out
}

// Without a date, the first of this many working days on which someone has room (about four weeks).
const SEARCH_WORKING_DAYS = 20

/** The working days a site's visit may go on: the chosen one, or the next few from tomorrow. */
function daysFor(cal: WorkCalendar, today: string, date: string | undefined): string[] {
  if (date) return [date]
  const days: string[] = []
  for (let d = cal.nextWorkingDay(addDays(today, 1)); days.length < SEARCH_WORKING_DAYS; d = cal.nextWorkingDay(addDays(d, 1))) days.push(d)
  return days
}

function correctionVisits(db: Db, ids: readonly number[], i: z.infer<typeof input>, ctx: BulkContext) {
  if (i.date !== undefined && i.date < ctx.today) throw new BulkError(400, `Pick today (${ctx.today}) or a later date`)
  const everyone = activeTechnicians(db)
  let chosen: FieldTechnician | null = null
  if (i.technicianId !== undefined) {
    chosen = everyone.find((t) => t.id === i.technicianId) ?? null
    if (!chosen) throw new BulkError(400, 'Choose an active technician, or leave it to each site’s usual one')
  }
  const rows = auditRows(db, ids, 'disagree')
  const bySite = new Map<number, AuditRow[]>()
  for (const r of rows) bySite.set(r.siteId, [...(bySite.get(r.siteId) ?? []), r])

  // A detector already on an open visit for a functional test is left there: add the check to that visit.
  const open = openFunctionalVisits(db, rows.map((r) => r.id))

  // Each technician's day as booked already (open visits from today on), in their own unit; the
  // visits planned here are added as they are placed, so two sites never share the same room.
  const pool = chosen ? [chosen] : everyone
  const byId = new Map(pool.map((t) => [t.id, t]))
  const load = new Map<string, number>()
  const key = (tech: number, date: string) => `${tech}|${date}`
  for (const b of bookedVisits(db, pool.map((t) => t.id), ctx.today)) load.set(key(b.technicianId, b.scheduledOn), (load.get(key(b.technicianId, b.scheduledOn)) ?? 0) + weight(byId.get(b.technicianId), b.detectorCount))
  const usual = chosen ? new Map<number, { id: number }>() : usualTechnicians(db, [...bySite.keys()])

  const changes: BulkChange[] = []
  const refused: BulkRefusal[] = []
  // Sites share a handful of regions: each region's days are worked out once.
  const daysByRegion = new Map<string, string[]>()
  // Sites in a fixed order (by id), so the same data always gives the same plan, preview and apply alike.
  for (const siteId of [...bySite.keys()].sort((a, b) => a - b)) {
    const all = bySite.get(siteId)!
    const { site, region } = all[0]
    const label = (r: AuditRow) => `${r.tag} · ${site}`
    const refuse = (rs: readonly AuditRow[], reason: string) => rs.forEach((r) => refused.push({ id: r.id, label: label(r), reason }))
    const booked = all.filter((r) => open.has(r.id))
    for (const r of booked) refused.push({ id: r.id, label: label(r), reason: `Already on open visit ${open.get(r.id)!.visitId} (${open.get(r.id)!.on}) for a functional test; add the delay check there` })
    const todo = all.filter((r) => !open.has(r.id))
    if (todo.length === 0) continue

    let cal: WorkCalendar
    try {
      cal = ctx.calendar.forRegion(region)
    } catch {
      refuse(todo, `Unknown holiday region '${region}' for ${site}`)
      continue
    }
    const off = i.date ? ctx.calendar.dayOff(region, i.date) : null
    if (off) {
      refuse(todo, `${i.date} is not a working day at ${site} (${off}); the next one is ${cal.nextWorkingDay(i.date!)}`)
      continue
    }
    // Who may go: the chosen technician, else the site's usual one first, then everyone else covering its region.
    const usualId = usual.get(siteId)?.id
    const able = pool.filter((t) => covers(t, region))
    if (able.length === 0) {
      refuse(todo, chosen ? `${chosen.name} does not cover ${region}` : `No active technician covers ${region}`)
      continue
    }
    let days = daysByRegion.get(region)
    if (!days) daysByRegion.set(region, (days = daysFor(cal, ctx.today, i.date)))
    let placed: { tech: FieldTechnician; date: string } | null = null
    for (const date of days) {
      const has = (t: FieldTechnician) => load.get(key(t.id, date)) ?? 0
      const room = able
        .filter((t) => has(t) + weight(t, todo.length) <= limitOf(t))
        .sort((a, b) => Number(b.id === usualId) - Number(a.id === usualId) || has(a) - has(b) || a.name.localeCompare(b.name))
      if (room.length) {
        placed = { tech: room[0], date }
        break
      }
    }
    if (!placed) {
      const when = i.date ? `on ${i.date}` : `in the next ${SEARCH_WORKING_DAYS} working days`
      const most = Math.max(...able.map((t) => (t.capacityUnit === 'visits' ? Infinity : limitOf(t))))
      refuse(
        todo,
        todo.length > most
          ? `${plural(todo.length, 'detector')} at ${site} are more than any technician covering ${region} takes in a day (${most} at most)`
          : `No technician covering ${region} has room ${when} for ${plural(todo.length, 'detector')} at ${site}`,
      )
      continue
    }
    const { tech, date } = placed
    load.set(key(tech.id, date), (load.get(key(tech.id, date)) ?? 0) + weight(tech, todo.length))
    const create = {
      siteId,
      kind: 'repair' as const,
      scheduledOn: date,
      technicianId: tech.id,
      notes: correctionNotes(todo),
      detectors: todo.map((r) => ({ detectorId: r.id, tasks: ['functional' as const] })),
    }
    changes.push(createChange(`${site} · ${date} · ${tech.name}`, create, { site, kind: 'repair', scheduledOn: date, technician: tech.name, detectors: todo.length }))
  }
  changes.sort((a, b) => a.label.localeCompare(b.label))
  refused.sort((a, b) => a.label.localeCompare(b.label))
  const detectorCount = changes.reduce((n, c) => n + (c.create?.detectors.length ?? 0), 0)
  const summary = `Book ${plural(changes.length, 'correction visit')} for ${plural(detectorCount, 'disagreeing detector')}, one per site, within each technician's regions and daily capacity`
  return { changes, refused, summary }
}

/**
 * The delay-setting audit over a selection (or the fleet through a list filter): counts per outcome
 * from the stored agreement, then either marks agreeing settings verified today, or books one
 * 'repair' visit per site for the detectors whose setting disagrees with the site's policy, on a
 * working day of the company calendar, with a technician who covers the site's region and has room
 * that day (the site's usual technician first); a site no one can take is refused with the reason.
 */
export const delayAudit = defineAction({
  name: 'delay-audit',
  title: 'Delay-setting audit',
  entity: 'detector',
  // A selection of sites or customers stands for their detectors.
  through: ['sites', 'customers'],
  capability: 'schedule:visits',
  input,
  preview(db, ids, i, ctx) {
    const counts = countSelection(db, ids)
    const plan = i.do === 'verify' ? verify(db, ids, ctx, counts) : correctionVisits(db, ids, i, ctx)
    const cautions: string[] = []
    if (counts.policiesBeyond > 0 || counts.settingsBeyond > 0) {
      cautions.push(
        `${[counts.policiesBeyond > 0 && `${plural(counts.policiesBeyond, 'site')} agreed`, counts.settingsBeyond > 0 && `${plural(counts.settingsBeyond, 'detector')} set to`].filter(Boolean).join(', and ')} a delay longer than the ${TROUBLE_REPORTING_SECONDS} s NFPA 72 allows for a trouble to be annunciated: verify with the AHJ.`,
      )
    }
    return { ...plan, extra: { audit: counts, limitSeconds: TROUBLE_REPORTING_SECONDS, cautions } }
  },
})

/** The engine's advice for one detector, for the page and the file. */
export const adviceFor = (delaySeconds: number | null, policySeconds: number) => auditDelay({ delaySeconds, policySeconds }).action
