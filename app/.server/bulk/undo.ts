import { eq } from 'drizzle-orm'
import { can, type Role } from '~/domain/permissions'
import { writeAudit } from '../audit'
import { writeTx, type Db } from '../db'
import { listsChanged } from '../list-query'
import { bulkChanges } from '../schema'
import { BulkError, type BulkEntity } from './action'
import { removeVisit, workStarted } from './creates'
import { removeHistory } from './history'
import { rederiveDetectors, type ChangedRecord } from './runner'
import { currentVersions, writeFields } from './write'

const UNDO_WINDOW_MS = 24 * 3_600_000
const NAMED = 20

export interface UndoAnswer {
  changeId: number
  restored: number
  summary: string
}

/**
 * Puts back exactly the fields a bulk change replaced on every record (and removes the visits it
 * booked and the history lines it wrote), in one IMMEDIATE transaction, bumping each version; or
 * refuses the whole undo, naming the records that someone changed since. Open for a day, to the person who made the change and to leads and admins.
 */
export function undoBulk(db: Db, changeId: number, actor: { id: number; role: Role }, today: string, now = new Date()): UndoAnswer {
  const answer = writeTx(db, () => {
    const change = db.select().from(bulkChanges).where(eq(bulkChanges.id, changeId)).get()
    if (!change) throw new BulkError(404, `No bulk change ${changeId}`)
    if (change.actorId !== actor.id && !can(actor.role, 'run:bulk')) {
      throw new BulkError(403, 'Only the person who made this change, or a lead or admin, can undo it.')
    }
    if (change.undoneAt) throw new BulkError(409, `This change was already undone at ${change.undoneAt}.`)
    if (now.getTime() - Date.parse(change.at) > UNDO_WINDOW_MS) {
      throw new BulkError(409, 'This change is more than 24 hours old; change the records again instead of undoing it.')
    }
    const records = change.records as ChangedRecord[]
    const moved: ChangedRecord[] = []
    for (const entity of ['visit', 'detector'] as BulkEntity[]) {
      const mine = records.filter((r) => r.entity === entity)
      if (mine.length === 0) continue
      const versions = currentVersions(db, entity, mine.map((r) => r.id))
      for (const r of mine) if (versions.get(r.id) !== r.version) moved.push(r)
    }
    for (const r of workStarted(db, records)) if (!moved.includes(r)) moved.push(r)
    if (moved.length > 0) {
      const names = moved.slice(0, NAMED).map((r) => r.label).join('; ')
      const more = moved.length > NAMED ? ` and ${moved.length - NAMED} more` : ''
      throw new BulkError(409, `Not undone: ${moved.length} of the records changed since (${names}${more}). Nothing was put back.`)
    }
    for (const r of records) {
      if (!(r.created ? removeVisit(db, r) : writeFields(db, r.entity, r.id, r.before, r.version))) throw new Error(`Record ${r.entity} ${r.id} moved during the undo`)
    }
    // The history lines the change wrote go with it, so the detector's history is as it was.
    removeHistory(db, records.flatMap((r) => (r.eventId ? [r.eventId] : [])))
    rederiveDetectors(db, records, today)
    const undoneAt = now.toISOString()
    db.update(bulkChanges).set({ undoneAt, undoneBy: actor.id }).where(eq(bulkChanges.id, changeId)).run()
    writeAudit(db, {
      actorId: actor.id,
      action: 'bulk.undo',
      entity: records[0]?.entity ?? 'bulk',
      entityId: changeId,
      before: { action: change.action, summary: change.summary },
      after: { changeId, count: records.length, records: records.map((r) => r.id) },
    })
    return { changeId, restored: records.length, summary: change.summary }
  })
  listsChanged()
  return answer
}
