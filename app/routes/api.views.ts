import { z } from 'zod'
import { writeAudit } from '~/.server/audit'
import { requireUser } from '~/.server/auth'
import { getDb, writeTx } from '~/.server/db'
import { readJsonOrForm } from '~/.server/http'
import { idParam, parseQuery } from '~/.server/list-query'
import type { RouteAccess } from '~/domain/permissions'
import type { Route } from './+types/api.views'

// sampleQuery: what the route × role test sends to reach the loader with valid input.
export const handle = { access: { loader: 'view:fleet', action: 'view:fleet' } satisfies RouteAccess, sampleQuery: 'page=devices' }

const PAGES = ['devices', 'events', 'sites', 'customers', 'visits', 'triage'] as const
const listParams = z.object({ page: z.enum(PAGES) })
const name = z.string().trim().min(1, 'Name the view').max(60, 'Keep the name to 60 characters')
// A form post sends "true"; JSON sends a boolean.
const overwrite = z.preprocess((v) => v === true || v === 'true', z.boolean()).default(false)
const body = z.discriminatedUnion('intent', [
  z.object({ intent: z.literal('save'), page: z.enum(PAGES), name, query: z.string().max(2_000), overwrite }),
  z.object({ intent: z.literal('rename'), id: idParam, name, overwrite }),
  z.object({ intent: z.literal('delete'), id: idParam }),
])

interface ViewRow {
  id: number
  page: string
  name: string
  query: string
}

// A name already in use answers 409 unless the caller said to replace it: nothing is lost to a slip
// of the keyboard. The page asks the person, then sends `overwrite: true`.
const clash = (taken: ViewRow) =>
  Response.json({ error: `You already have a view named “${taken.name}”.`, conflict: { id: taken.id, name: taken.name } }, { status: 409 })

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
  const input = await readJsonOrForm(request, body)
  const db = getDb()
  const q = db.$client
  const named = (page: string, n: string) =>
    q.prepare('select id, page, name, query from saved_views where user_id = ? and page = ? and name = ?').get(user.id, page, n) as ViewRow | undefined

  if (input.intent === 'save') {
    const { overwrite: replace, ...after } = input
    const result = writeTx(db, () => {
      const taken = named(input.page, input.name)
      if (taken && !replace) return { clash: taken }
      // `returning` gives the row's own id on both paths; lastInsertRowid would not on an update.
      const row = q
        .prepare(
          `insert into saved_views (user_id, page, name, query) values (?, ?, ?, ?)
           on conflict (user_id, page, name) do update set query = excluded.query returning id`,
        )
        .get(user.id, input.page, input.name, input.query) as { id: number }
      writeAudit(db, { actorId: user.id, action: 'view.save', entity: 'saved_view', entityId: row.id, before: taken ? { query: taken.query } : undefined, after })
      return { id: row.id }
    })
    return result.clash ? clash(result.clash) : Response.json({ ok: true, id: result.id })
  }

  if (input.intent === 'rename') {
    const result = writeTx(db, () => {
      const view = q.prepare('select id, page, name, query from saved_views where id = ? and user_id = ?').get(input.id, user.id) as ViewRow | undefined
      if (!view) return { missing: true as const }
      if (view.name === input.name) return { id: view.id }
      const taken = named(view.page, input.name)
      if (taken && !input.overwrite) return { clash: taken }
      if (taken) {
        q.prepare('delete from saved_views where id = ?').run(taken.id)
        writeAudit(db, { actorId: user.id, action: 'view.delete', entity: 'saved_view', entityId: taken.id, before: taken })
      }
      q.prepare('update saved_views set name = ? where id = ?').run(input.name, view.id)
      writeAudit(db, { actorId: user.id, action: 'view.rename', entity: 'saved_view', entityId: view.id, before: { name: view.name }, after: { name: input.name } })
      return { id: view.id }
    })
    if (result.missing) return Response.json({ error: 'No such view of yours.' }, { status: 404 })
    return result.clash ? clash(result.clash) : Response.json({ ok: true, id: result.id })
  }

  const removed = writeTx(db, () => {
    const row = q.prepare('select page, name, query from saved_views where id = ? and user_id = ?').get(input.id, user.id)
    if (!row) return false
    q.prepare('delete from saved_views where id = ?').run(input.id)
    writeAudit(db, { actorId: user.id, action: 'view.delete', entity: 'saved_view', entityId: input.id, before: row })
    return true
  })
  return removed ? Response.json({ ok: true }) : Response.json({ error: 'No such view of yours.' }, { status: 404 })
}
