import { requireUser } from '~/.server/auth'
import { getDb } from '~/.server/db'
import { parseQuery, runList } from '~/.server/list-query'
import { asVisitRow, visitList, visitQuery, type VisitListRowRaw } from '~/.server/lists/visits'
import type { RouteAccess } from '~/domain/permissions'
import type { Route } from './+types/api.visits'

export const handle = { access: { loader: 'view:fleet' } satisfies RouteAccess }

export async function loader({ request }: Route.LoaderArgs) {
  await requireUser(request, 'view:fleet')
  const query = parseQuery(visitQuery, request)
  const page = runList<typeof query, VisitListRowRaw>(getDb(), visitList, query)
  return Response.json({ ...page, rows: page.rows.map(asVisitRow) })
}
