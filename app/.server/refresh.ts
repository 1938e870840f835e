import type { Db } from './db'
import { dayTurnQueries, derivedDay, rederiveFleet, restAfter, rederiveFleetInTurns, rederiveInTurns, setDerivedDay, turnPlan } from './derivation'
import { listsChanged } from './list-query'
import { officeToday } from './today'

/**
 * Re-derives every detector's stored facts for `today` at once (tests, scripts). A new day moves
 * detectors from "up to date" to "due soon" to "overdue", and troubles age out of the 30-day window,
 * without anyone touching them. Only changed rows are written.
 */
export function refreshDerived(db: Db, today: string): { checked: number; changed: number } {
  const result = rederiveFleet(db, today)
  setDerivedDay(db, today)
  if (result.changed > 0) listsChanged()
  return result
}

export interface RefreshResult {
  from: string | null
  to: string
  plan: 'candidates' | 'fleet'
  checked: number
  changed: number
  turns: number
  slowestTurnMs: number
  slowestTurnCpuMs: number
  ms: number
}

let running: Promise<RefreshResult | null> | null = null

/**
 * Brings the stored facts to the office's day if it has turned since they were last derived (the day
 * is kept in the database, so a restart does not redo it). A short turn re-derives only the detectors
 * whose facts can change; a first start or a long gap walks the fleet. Either way the work runs in
 * chunks that give the event loop back between them, so requests are answered meanwhile.
 */
export function refreshIfNewDay(db: Db, to = officeToday()): Promise<RefreshResult | null> {
  if (running) return running
  const work = (async () => {
    const from = derivedDay(db)
    const plan = turnPlan(from, to)
    if (plan === 'none') return null
    const started = performance.now()
    let stats
    if (plan === 'fleet') stats = await rederiveFleetInTurns(db, to)
    else {
      // One index query per turn, then the detectors found.
      const ids = new Set<number>()
      for (const query of dayTurnQueries(db, from as string, to)) {
        const t = performance.now()
        for (const id of query()) ids.add(id)
        await restAfter(performance.now() - t)
      }
      stats = await rederiveInTurns(db, [...ids].sort((x, y) => x - y), to)
    }
    setDerivedDay(db, to)
    if (stats.changed > 0) listsChanged()
    return { from, to, plan, ...stats, ms: Math.round(performance.now() - started) }
  })()
  // One refresh at a time: a tick that comes while one runs waits for it instead of starting another.
  running = work.finally(() => {
    running = null
  })
  return running
}
