import type { Db } from './db'
import { rederiveFleet, rederiveFleetInTurns } from './derivation'
import { listsChanged } from './list-query'
import { officeToday } from './today'

/**
 * Re-derives every detector's stored facts for `today`. A new day moves detectors from "up to date"
 * to "due soon" to "overdue", and troubles age out of the 30-day window, without anyone touching
 * them. Only changed rows are written.
 */
export function refreshDerived(db: Db, today: string): { checked: number; changed: number } {
  const result = rederiveFleet(db, today)
  if (result.changed > 0) listsChanged()
  return result
}

let lastDay: string | null = null

/**
 * Refreshes once per office day: at first use, then whenever the day has turned. Runs in chunks that
 * give the event loop back between them, so a start or a day turn does not hold requests up.
 */
export async function refreshIfNewDay(db: Db, now = new Date()) {
  const today = officeToday(now)
  if (today === lastDay) return null
  lastDay = today
  const result = await rederiveFleetInTurns(db, today)
  if (result.changed > 0) listsChanged()
  return result
}
