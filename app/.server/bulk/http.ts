import { z } from 'zod'
import { can, refusal } from '~/domain/permissions'
import type { CurrentUser } from '../auth'
import { readJson } from '../http'
import { idParam } from '../list-query'
import { runJob } from '../offload'
import { bulkAction } from './registry'
import { selectionSchema } from './selection'

const body = selectionSchema
  .extend({
    preview: z.boolean({ error: 'Say preview: true to see the change, or false to apply it' }),
    previewId: z.string().uuid().optional(),
    versions: z.record(z.string().regex(/^[1-9][0-9]{0,15}$/, 'Record ids in plain digits'), z.number().int().min(1)).optional(),
  })
  .loose()
const OWN_KEYS = ['preview', 'previewId', 'versions', 'ids', 'filter', 'list']

/** POST /api/bulk/:action — preview or apply one bulk action for the signed-in user. */
export async function bulkRequest(request: Request, name: string, user: CurrentUser): Promise<Response> {
  const action = bulkAction(name)
  if (!action) return Response.json({ error: `No bulk action '${name}'` }, { status: 404 })
  if (!can(user.role, action.capability)) return Response.json({ error: refusal(user.role, action.capability) }, { status: 403 })
  const b = await readJson(request, body)
  const rest = Object.fromEntries(Object.entries(b).filter(([k]) => !OWN_KEYS.includes(k)))
  const parsed = action.input.safeParse(rest)
  if (!parsed.success) {
    return Response.json({ error: 'Invalid request', issues: parsed.error.issues.map((i) => ({ path: i.path.join('.'), message: i.message })) }, { status: 400 })
  }
  if (b.list && !action.through?.includes(b.list)) {
    return Response.json({ error: `${action.title} is not offered on a selection of ${b.list}` }, { status: 400 })
  }
  // The selection and settings are checked here; resolving, previewing and writing run off this thread.
  const selection = { ids: b.ids, filter: b.filter, list: b.list, preview: b.preview, previewId: b.previewId, versions: b.versions }
  const { status, body: answer } = await runJob('bulk', { name, selection, input: parsed.data, user })
  return Response.json(answer, { status })
}

/** POST /api/bulk/undo {changeId}. */
export async function undoRequest(request: Request, user: CurrentUser): Promise<Response> {
  const { changeId } = await readJson(request, z.object({ changeId: idParam }))
  const { status, body: answer } = await runJob('undo', { changeId, user })
  return Response.json(answer, { status })
}
