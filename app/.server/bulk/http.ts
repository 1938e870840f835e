import { z } from 'zod'
import { can } from '~/domain/permissions'
import type { CurrentUser } from '../auth'
import { getDb } from '../db'
import { readJson } from '../http'
import { idParam } from '../list-query'
import { officeToday } from '../today'
import { BulkError, type BulkContext } from './action'
import { loadCompanyCalendar } from './calendar'
import { bulkAction } from './registry'
import { applyBulk, previewBulk, previewed } from './runner'
import { resolveScope, selectionSchema, type Selection } from './selection'
import { undoBulk } from './undo'

const body = selectionSchema
  .extend({
    preview: z.boolean({ error: 'Say preview: true to see the change, or false to apply it' }),
    previewId: z.string().uuid().optional(),
    versions: z.record(z.string().regex(/^[1-9][0-9]{0,15}$/, 'Record ids in plain digits'), z.number().int().min(1)).optional(),
  })
  .loose()
const OWN_KEYS = ['preview', 'previewId', 'versions', 'ids', 'filter', 'list']

const errorResponse = (error: unknown): Response => {
  if (error instanceof BulkError) return Response.json({ error: error.message }, { status: error.status })
  throw error
}

/** POST /api/bulk/:action — preview or apply one bulk action for the signed-in user. */
export async function bulkRequest(request: Request, name: string, user: CurrentUser): Promise<Response> {
  const action = bulkAction(name)
  if (!action) return Response.json({ error: `No bulk action '${name}'` }, { status: 404 })
  if (!can(user.role, action.capability)) return Response.json({ error: 'Your role does not allow this.' }, { status: 403 })
  const b = await readJson(request, body)
  const rest = Object.fromEntries(Object.entries(b).filter(([k]) => !OWN_KEYS.includes(k)))
  const parsed = action.input.safeParse(rest)
  if (!parsed.success) {
    return Response.json({ error: 'Invalid request', issues: parsed.error.issues.map((i) => ({ path: i.path.join('.'), message: i.message })) }, { status: 400 })
  }
  if (b.list && !action.through?.includes(b.list)) {
    return Response.json({ error: `${action.title} is not offered on a selection of ${b.list}` }, { status: 400 })
  }
  const db = getDb()
  const resolve = (s: Selection) => resolveScope(db, action.entity, s)
  const ctx: BulkContext = { actor: user, today: officeToday(), calendar: loadCompanyCalendar(db), now: new Date().toISOString() }
  try {
    if (b.preview) {
      const { ids, through } = resolve(b)
      return Response.json(previewBulk(db, action, ids, parsed.data, ctx, through))
    }
    if (b.previewId) {
      const p = previewed(b.previewId, action, parsed.data, user.id)
      return Response.json(applyBulk(db, action, parsed.data, p.ids, p.versions, ctx))
    }
    if (!b.versions) throw new BulkError(400, 'Preview first, then apply with the previewId, or with the selection and the versions the preview gave')
    const versions = new Map(Object.entries(b.versions).map(([id, v]) => [Number(id), v]))
    return Response.json(applyBulk(db, action, parsed.data, resolve(b).ids, versions, ctx))
  } catch (error) {
    return errorResponse(error)
  }
}

/** POST /api/bulk/undo {changeId}. */
export async function undoRequest(request: Request, user: CurrentUser): Promise<Response> {
  const { changeId } = await readJson(request, z.object({ changeId: idParam }))
  try {
    return Response.json(undoBulk(getDb(), changeId, user, officeToday()))
  } catch (error) {
    return errorResponse(error)
  }
}
