import { calendarFor, type WorkCalendar } from './calendar'
import { isIsoDate, type IsoDate } from './dates'

export type CalendarLookup = (region: string) => WorkCalendar

export interface CycleDetector {
  id: number
  siteId: number
  region: string
  /** Carried for the caller's time estimates; capacity here counts detectors, not minutes. */
  minutes?: number
  /** When its cleaning falls due: the site whose earliest due day is oldest (most overdue) is placed first. */
  dueOn?: IsoDate
}

export interface Technician {
  id: number
  /** Detectors one technician can clean in a working day (visits, with capacityUnit 'visits'). */
  dailyCapacity: number
  /** What dailyCapacity counts; detectors unless said. */
  capacityUnit?: 'detectors' | 'visits'
  /** The site regions the technician covers (ISO 3166-2); left out, every region. */
  regions?: string[]
}

/** Work a technician already has on a day, in the technician's own capacity unit. */
export interface CycleBooked {
  technicianId: number
  date: IsoDate
  amount: number
}

export interface PlannedVisit {
  siteId: number
  date: IsoDate
  technicianId: number
  detectorIds: number[]
}

export interface UnplacedDetector {
  detectorId: number
  siteId: number
  reason: string
}

export interface CyclePlan {
  visits: PlannedVisit[]
  unplaced: UnplacedDetector[]
  summary: { placed: number; unplaced: number; visits: number; days: number }
}

export interface CycleInput {
  detectors: CycleDetector[]
  from: IsoDate
  to: IsoDate
  technicians: Technician[]
  calendars?: CalendarLookup
  /** Work already booked, counted against each technician's day. */
  booked?: CycleBooked[]
}

/** Detectors (or any count) booked per technician per day. */
class Load {
  private byKey = new Map<string, number>()
  get(tech: number, date: IsoDate): number {
    return this.byKey.get(`${tech}|${date}`) ?? 0
  }
  add(tech: number, date: IsoDate, n: number) {
    this.byKey.set(`${tech}|${date}`, this.get(tech, date) + n)
  }
}

/** One calendar per region for the whole call; an unknown region gives its error instead. */
function calendarLookup(lookup: CalendarLookup = (r) => calendarFor(r)) {
  const seen = new Map<string, WorkCalendar | Error>()
  return (region: string): WorkCalendar | Error => {
    let cal = seen.get(region)
    if (!cal) {
      try {
        cal = lookup(region)
      } catch (e) {
        cal = e instanceof Error ? e : new Error(String(e))
      }
      seen.set(region, cal)
    }
    return cal
  }
}

const plural = (n: number, word: string) => `${n} ${word}${n === 1 ? '' : 's'}`

/**
 * Spreads a cleaning cycle over the working days of `from`..`to`. Sites are taken most overdue first
 * (earliest `dueOn`), then in siteId order; each goes, among the technicians covering its region, on the earliest working day (of its own region) where one technician has room for all
 * of its detectors, to the technician with the most room left that day, so the load spreads. A site
 * bigger than any technician's day is split over consecutive working days for one technician. What
 * cannot be placed is listed with the reason; no detector is dropped.
 */
export function planCycle(input: CycleInput): CyclePlan {
  const visits: PlannedVisit[] = []
  const unplaced: UnplacedDetector[] = []
  const reject = (ds: CycleDetector[], reason: string) =>
    ds.forEach((d) => unplaced.push({ detectorId: d.id, siteId: d.siteId, reason }))

  // Same input, same plan: work in siteId then id order whatever order the caller used.
  const sorted = [...input.detectors].sort((a, b) => a.siteId - b.siteId || a.id - b.id)
  const seenIds = new Set<number>()
  const groups = new Map<string, CycleDetector[]>()
  for (const d of sorted) {
    if (seenIds.has(d.id)) {
      reject([d], 'Same detector listed more than once; planned once only')
      continue
    }
    seenIds.add(d.id)
    // A site normally has one region; grouping by both keeps a data slip from using a wrong holiday list.
    const key = `${d.siteId}|${d.region}`
    const group = groups.get(key)
    if (group) group.push(d)
    else groups.set(key, [d])
  }

  const allTechs = uniqueById(input.technicians)
    .map((t): Tech => ({ id: t.id, cap: Math.floor(Math.max(0, t.dailyCapacity)), perVisit: t.capacityUnit === 'visits', regions: t.regions?.map((r) => r.trim().toUpperCase()) }))
    .filter((t) => t.cap > 0)
  const rangeOk = isIsoDate(input.from) && isIsoDate(input.to) && input.from <= input.to
  const calendar = calendarLookup(input.calendars)
  const daysByRegion = new Map<string, IsoDate[]>()
  const load = new Load()
  for (const b of input.booked ?? []) load.add(b.technicianId, b.date, b.amount)
  const total = new Map<number, number>() // detectors given to each technician so far, for balance
  const perVisit = new Set(allTechs.filter((t) => t.perVisit).map((t) => t.id))

  const book = (siteId: number, date: IsoDate, techId: number, ds: CycleDetector[]) => {
    visits.push({ siteId, date, technicianId: techId, detectorIds: ds.map((d) => d.id) })
    load.add(techId, date, perVisit.has(techId) ? 1 : ds.length)
    total.set(techId, (total.get(techId) ?? 0) + ds.length)
  }

  // Most overdue first: the site whose earliest due day is oldest; sites with no due day last, in siteId order.
  const earliest = (g: CycleDetector[]) => g.reduce<string | undefined>((m, d) => (d.dueOn !== undefined && (m === undefined || d.dueOn < m) ? d.dueOn : m), undefined)
  const ordered = [...groups.values()].map((g) => ({ g, due: earliest(g) }))
  ordered.sort((a, b) => (a.due === b.due ? 0 : a.due === undefined ? 1 : b.due === undefined ? -1 : a.due < b.due ? -1 : 1) || a.g[0].siteId - b.g[0].siteId)

  for (const { g: group } of ordered) {
    const { siteId, region } = group[0]
    const techs = allTechs.filter((t) => !t.regions || t.regions.includes(region.toUpperCase()))
    const maxCap = Math.max(0, ...techs.map((t) => (t.perVisit ? Infinity : t.cap)))
    if (!rangeOk) {
      reject(group, 'The date range is not valid: give two dates with the start on or before the end')
      continue
    }
    const cal = calendar(region)
    if (cal instanceof Error) {
      reject(group, `Unknown holiday region '${region}' for this site`)
      continue
    }
    let days = daysByRegion.get(region)
    if (!days) daysByRegion.set(region, (days = cal.workingDaysBetween(input.from, input.to)))
    if (days.length === 0) {
      reject(group, `No working day in the range for region ${region}`)
      continue
    }
    if (allTechs.length === 0) {
      reject(group, 'No technician with daily capacity')
      continue
    }
    if (techs.length === 0) {
      reject(group, `No chosen technician covers region ${region}`)
      continue
    }

    if (group.length <= maxCap) {
      const slot = wholeSiteSlot(days, techs, load, total, group.length)
      if (slot) book(siteId, slot.date, slot.techId, group)
      else reject(group, `No working day left in the range with room for all ${plural(group.length, 'detector')} of this site`)
      continue
    }

    const run = splitRun(days, techs.filter((t) => !t.perVisit), load, total, group.length)
    if (!run) {
      reject(group, 'No working day left in the range with capacity')
      continue
    }
    let next = 0
    for (const [date, n] of run.chunks) {
      book(siteId, date, run.techId, group.slice(next, next + n))
      next += n
    }
    if (next < group.length) {
      reject(
        group.slice(next),
        `The range ends before this site is finished: ${next} of ${group.length} detectors fit on consecutive working days`,
      )
    }
  }

  visits.sort((a, b) => a.siteId - b.siteId || a.date.localeCompare(b.date) || a.technicianId - b.technicianId)
  unplaced.sort((a, b) => a.siteId - b.siteId || a.detectorId - b.detectorId)
  const placed = visits.reduce((sum, v) => sum + v.detectorIds.length, 0)
  return {
    visits,
    unplaced,
    summary: { placed, unplaced: unplaced.length, visits: visits.length, days: new Set(visits.map((v) => v.date)).size },
  }
}

type Tech = { id: number; cap: number; perVisit?: boolean; regions?: string[] }

function uniqueById<T extends { id: number }>(list: T[]): T[] {
  const byId = new Map<number, T>()
  for (const t of list) if (!byId.has(t.id)) byId.set(t.id, t)
  return [...byId.values()].sort((a, b) => a.id - b.id)
}

/** Earliest day one technician has room for n; among them the most room left, then least given so far. */
function wholeSiteSlot(days: IsoDate[], techs: Tech[], load: Load, total: Map<number, number>, n: number) {
  for (const date of days) {
    let best: { techId: number; room: number; given: number } | null = null
    for (const t of techs) {
      // A technician counting visits has room for any site while one visit is left; room is then weighed in detectors.
      const room = t.perVisit ? (t.cap - load.get(t.id, date) >= 1 ? (t.cap - load.get(t.id, date)) * n : -1) : t.cap - load.get(t.id, date)
      if (room < n) continue
      const given = total.get(t.id) ?? 0
      if (!best || room > best.room || (room === best.room && given < best.given)) best = { techId: t.id, room, given }
    }
    if (best) return { date, techId: best.techId }
  }
  return null
}

/**
 * For a site bigger than a day: one technician on consecutive working days, taking the room left
 * each day. Prefers the run that places the most, then the earliest start, then the fewest days,
 * then the technician given least so far.
 */
type Run = { techId: number; chunks: Array<[IsoDate, number]>; placed: number; given: number }

function splitRun(days: IsoDate[], techs: Tech[], load: Load, total: Map<number, number>, n: number): Run | null {
  let best = null as Run | null
  for (let start = 0; start < days.length; start++) {
    for (const t of techs) {
      const chunks: Array<[IsoDate, number]> = []
      let left = n
      for (let j = start; j < days.length && left > 0; j++) {
        const room = t.cap - load.get(t.id, days[j])
        if (room <= 0) break
        const take = Math.min(room, left)
        chunks.push([days[j], take])
        left -= take
      }
      const placed = n - left
      if (placed === 0) continue
      const given = total.get(t.id) ?? 0
      const better =
        !best ||
        placed > best.placed ||
        (placed === best.placed &&
          (chunks.length < best.chunks.length || (chunks.length === best.chunks.length && given < best.given)))
      if (better) best = { techId: t.id, chunks, placed, given }
    }
    // Starts are tried earliest first, so the first start that finishes the site is the one to keep.
    if (best && best.placed === n) break
  }
  return best
}

// ---------------------------------------------------------------------------------------------
// Bulk shift

export interface VisitToShift {
  id: number
  siteId: number
  region: string
  date: IsoDate
  /** null: not yet given to a technician, so no daily capacity applies. */
  technicianId: number | null
  detectorCount: number
}

export interface BookedLoad {
  technicianId: number
  date: IsoDate
  detectorCount: number
}

export interface ShiftInput {
  visits: VisitToShift[]
  /** Move each visit this many working days of its site's region (negative: earlier). */
  by?: { businessDays: number }
  /** Or move every visit to this date (the next working day with room when it is off or full). */
  to?: IsoDate
  /** technicianId → detectors per working day. */
  capacity: Map<number, number> | Record<number, number>
  /** Visits already booked that are not being moved. */
  existingLoad?: BookedLoad[]
  calendars?: CalendarLookup
  /** Last date a visit may land on; by default 60 working days after its target. */
  limitDate?: IsoDate
  /** false: a visit whose target day is full stays where it is, reported, instead of rolling on. */
  roll?: boolean
  /** A visit that would land before this day stays where it is, reported (the office's today). */
  earliest?: IsoDate
}

export interface ShiftResult {
  moved: Array<{ id: number; from: IsoDate; to: IsoDate }>
  unplaced: Array<{ id: number; reason: string }>
}

// How far a visit may roll forward looking for room: the product's own call, about three months
// of working days, after which a dispatcher should look at it by hand.
export const DEFAULT_SHIFT_LIMIT_WORKING_DAYS = 60

/**
 * Moves visits by N working days or to a date, keeping each technician within daily capacity
 * (visits already booked plus those moved here). A visit that finds its target day off or full
 * rolls to the next working day with room, up to the limit; the rest are reported with a reason.
 * Visits are handled in date then id order, so earlier visits keep their place in the queue.
 *
 * A visit that cannot move stays on its own day and weighs on it: the visits are placed again with
 * those counted where they are, until no more are left behind. A single pass, placing each visit
 * as if every other had left its day, let a visit move onto a day that one left behind still filled.
 */
export function shiftVisits(input: ShiftInput): ShiftResult {
  const stays = new Map<number, string>()
  for (;;) {
    const pass = shiftPass(input, stays)
    if (pass.unplaced.length === 0) {
      const unplaced = [...stays].map(([id, reason]) => ({ id, reason })).sort((a, b) => a.id - b.id)
      return { moved: pass.moved, unplaced }
    }
    // Each pass leaves behind only visits the one before moved, so this ends within as many passes as visits.
    for (const u of pass.unplaced) stays.set(u.id, u.reason)
  }
}

/** One placing of the visits not in `stays`, with each of those weighing on its own day. */
function shiftPass(input: ShiftInput, stays: ReadonlyMap<number, string>): ShiftResult {
  const moved: ShiftResult['moved'] = []
  const unplaced: ShiftResult['unplaced'] = []
  const capOf = (tech: number): number | undefined =>
    input.capacity instanceof Map ? input.capacity.get(tech) : input.capacity[tech]
  const load = new Load()
  for (const b of input.existingLoad ?? []) load.add(b.technicianId, b.date, b.detectorCount)
  for (const v of input.visits) if (stays.has(v.id) && v.technicianId !== null && Number.isInteger(v.detectorCount) && v.detectorCount > 0) load.add(v.technicianId, v.date, v.detectorCount)
  const calendar = calendarLookup(input.calendars)

  const how = shiftRule(input)
  const order = input.visits.filter((v) => !stays.has(v.id)).sort((a, b) => a.date.localeCompare(b.date) || a.id - b.id)
  for (const v of order) {
    const fail = (reason: string) => unplaced.push({ id: v.id, reason })
    if (typeof how === 'string') {
      fail(how)
      continue
    }
    const cal = calendar(v.region)
    if (cal instanceof Error) {
      fail(`Unknown holiday region '${v.region}' for this site`)
      continue
    }
    if (!isIsoDate(v.date)) {
      fail(`The visit's date '${v.date}' is not a valid date`)
      continue
    }
    if (!Number.isInteger(v.detectorCount) || v.detectorCount < 0) {
      fail('The visit has no valid detector count')
      continue
    }
    const cap = v.technicianId === null ? Infinity : capOf(v.technicianId)
    if (cap === undefined || !(cap > 0)) {
      fail(`No daily capacity is set for technician ${v.technicianId}`)
      continue
    }
    if (v.detectorCount > cap) {
      fail(`The visit has ${plural(v.detectorCount, 'detector')}, more than technician ${v.technicianId} can do in a day (${cap})`)
      continue
    }

    const target = how.by !== undefined ? cal.addWorkingDays(v.date, how.by) : cal.nextWorkingDay(how.to)
    const limit = input.roll === false ? target : (input.limitDate ?? cal.addWorkingDays(target, DEFAULT_SHIFT_LIMIT_WORKING_DAYS))
    if (limit < target) {
      fail(`The target day ${target} is after the last allowed day ${limit}`)
      continue
    }
    let landed: IsoDate | null = null
    for (let d = target; d <= limit; d = cal.addWorkingDays(d, 1)) {
      if (v.technicianId === null || load.get(v.technicianId, d) + v.detectorCount <= cap) {
        landed = d
        break
      }
    }
    if (!landed && input.roll === false) {
      const room = Math.max(0, cap - load.get(v.technicianId!, target))
      fail(`Technician ${v.technicianId} is full on ${target}: ${room} of ${cap} left, the visit needs ${v.detectorCount}`)
      continue
    }
    if (!landed) {
      fail(`No working day with room for technician ${v.technicianId} from ${target} to ${limit}`)
      continue
    }
    if (input.earliest !== undefined && landed < input.earliest) {
      fail(`Would land on ${landed}, before today`)
      continue
    }
    if (v.technicianId !== null) load.add(v.technicianId, landed, v.detectorCount)
    moved.push({ id: v.id, from: v.date, to: landed })
  }

  moved.sort((a, b) => a.id - b.id)
  unplaced.sort((a, b) => a.id - b.id)
  return { moved, unplaced }
}

/** Exactly one of `by` and `to`; otherwise the reason every visit stays where it is. */
function shiftRule(input: ShiftInput): { by: number; to?: undefined } | { by?: undefined; to: IsoDate } | string {
  const hasBy = input.by !== undefined
  const hasTo = input.to !== undefined
  if (hasBy === hasTo) return 'Give either a number of working days or a target date, not both or neither'
  if (input.limitDate !== undefined && !isIsoDate(input.limitDate)) return `The last allowed day '${input.limitDate}' is not a valid date`
  if (hasBy) {
    const n = input.by!.businessDays
    return Number.isInteger(n) ? { by: n } : `Working days must be a whole number, got ${n}`
  }
  return isIsoDate(input.to!) ? { to: input.to! } : `The target date '${input.to}' is not a valid date`
}
