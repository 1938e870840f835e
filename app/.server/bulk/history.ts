import type { Db } from '../db'

/**
 * Writes one line to a detector's history (an event of kind 'change', by the person, at the
 * instant), at the detector's site; returns the event's id so an undo can take it back.
 */
export function writeHistory(db: Db, detectorId: number, detail: string, userId: number, at: string): number {
  // Raw SQL: insert … select reads the detector's site in the same statement.
  const run = db.$client
    .prepare("insert into events (site_id, detector_id, occurred_at, kind, detail, user_id) select site_id, id, ?, 'change', ?, ? from detectors where id = ?")
    .run(at, detail, userId, detectorId)
  if (run.changes !== 1) throw new Error(`Detector ${detectorId} is gone; its history cannot be written`)
  return Number(run.lastInsertRowid)
}

/** Removes history lines a bulk change wrote (its undo). */
export function removeHistory(db: Db, eventIds: readonly number[]) {
  const remove = db.$client.prepare("delete from events where id = ? and kind = 'change'")
  for (const id of eventIds) remove.run(id)
}
