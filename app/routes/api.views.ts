import { z } from 'zod'
import { writeAudit } from '~/.server/audit'
import { requireUser } from '~/.server/auth'
import { getDb } from '~/.server/db'
import { parseQuery } from '~/.server/list-query'
import type { RouteAccess } from '~/domain/permissions'
import type { Route } from './+types/api.views'

// sampleQuery: what the route × role test sends to reach the loader with valid input.
export const handle = { access: { loader: 'view:fleet', action: 'view:fleet' } satisfies RouteAccess, sampleQuery: 'page=devices' }

const PAGES = ['devices', 'events', 'sites', 'customers', 'visits', 'triage'] as const
const listParams = z.object({ page: z.enum(PAGES) })
const body = z.discriminatedUnion('intent', [
  z.object({ intent: z.literal('save'), page: z.enum(PAGES), name: z.string().trim().min(1, 'Name the view').max(60), query: z.string().max(2_000) }),
  z.object({ intent: z.literal('delete'), id: z.coerce.number().int().positive() }),
])

/** A person's saved views of a list page: each is the page's query string under a name. */
export async function loader({ request }: Route.LoaderArgs) {
  const user = await requireUser(request, 'view:fleet')
  const { page } = parseQuery(listParams, request)
  const views = getDb()
    .$client.prepare('select id, name, query from saved_views where user_id = ? and page = ? order by name')
    .all(user.id, page)
  return Response.json({ views })
}

export async function action({ request }: Route.ActionArgs) {
  const user = await requireUser(request, 'view:fleet')
  const raw = request.headers.get('Content-Type')?.includes('json') ? await request.json().catch(() => null) : Object.fromEntries(await request.formData())
  const parsed = body.safeParse(raw)
  if (!parsed.success) {
    return Response.json({ error: 'Invalid request', issues: parsed.error.issues.map((i) => ({ path: i.path.join('.'), message: i.message })) }, { status: 400 })
  }
  const db = getDb()
  const q = db.$client
  const input = parsed.data
  if (input.intent === 'save') {
    const id = q.transaction(() => {
      const before = q.prepare('select query from saved_views where user_id = ? and page = ? and name = ?').get(user.id, input.page, input.name)
      // `returning` gives the row's own id on both paths; lastInsertRowid would not on an update.
      const row = q
        .prepare(
          `insert into saved_views (user_id, page, name, query) values (?, ?, ?, ?)
           on conflict (user_id, page, name) do update set query = excluded.query returning id`,
        )
        .get(user.id, input.page, input.name, input.query) as { id: number }
      writeAudit(db, { actorId: user.id, action: 'view.save', entity: 'saved_view', entityId: row.id, before, after: input })
      return row.id
    })()
    return Response.json({ ok: true, id })
  }
  const removed = q.transaction(() => {
    const row = q.prepare('select page, name, query from saved_views where id = ? and user_id = ?').get(input.id, user.id)
    if (!row) return false
    q.prepare('delete from saved_views where id = ?').run(input.id)
    writeAudit(db, { actorId: user.id, action: 'view.delete', entity: 'saved_view', entityId: input.id, before: row })
    return true
  })()
  return removed ? Response.json({ ok: true }) : Response.json({ error: 'No such view of yours.' }, { status: 404 })
}
