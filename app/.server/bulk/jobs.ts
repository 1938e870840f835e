import type { CurrentUser } from '../auth'
import type { Db } from '../db'
import { officeToday } from '../today'
import { BulkError, type BulkContext } from './action'
import { loadCompanyCalendar } from './calendar'
import { bulkAction } from './registry'
import { applyBulk, previewBulk, previewed } from './runner'
import { resolveScope, type Selection } from './selection'
import { undoBulk } from './undo'

/** A bulk request already checked at the door (action known, role allowed, body and settings valid). */
export interface BulkJob {
  name: string
  selection: Selection & { preview: boolean; previewId?: string; versions?: Record<string, number> }
  input: unknown
  user: CurrentUser
}

/** What a job answers: the route turns it into the HTTP response as it stands. */
export interface JobAnswer {
  status: number
  body: unknown
}

function answer(run: () => unknown): JobAnswer {
  try {
    return { status: 200, body: run() }
  } catch (error) {
    if (error instanceof BulkError) return { status: error.status, body: { error: error.message } }
    throw error
  }
}

/**
 * Resolves the selection and previews or applies the action. Runs off the request thread when it can
 * (`offload.ts`): a preview of 10,000 visits takes most of a second, and the apply as long again.
 */
export function runBulkJob(db: Db, { name, selection: b, input, user }: BulkJob): JobAnswer {
  const action = bulkAction(name)
  if (!action) return { status: 404, body: { error: `No bulk action '${name}'` } }
  const ctx: BulkContext = { actor: user, today: officeToday(), calendar: loadCompanyCalendar(db), now: new Date().toISOString() }
  const resolve = (s: Selection) => resolveScope(db, action.entity, s)
  return answer(() => {
    if (b.preview) {
      const { ids, through } = resolve(b)
      return previewBulk(db, action, ids, input, ctx, through)
    }
    if (b.previewId) {
      const p = previewed(b.previewId, action, input, user.id)
      return applyBulk(db, action, input, p.ids, p.versions, ctx)
    }
    if (!b.versions) throw new BulkError(400, 'Preview first, then apply with the previewId, or with the selection and the versions the preview gave')
    const versions = new Map(Object.entries(b.versions).map(([id, v]) => [Number(id), v]))
    return applyBulk(db, action, input, resolve(b).ids, versions, ctx)
  })
}

export function runUndoJob(db: Db, { changeId, user }: { changeId: number; user: CurrentUser }): JobAnswer {
  return answer(() => undoBulk(db, changeId, user, officeToday()))
}
