import { requireUser } from '~/.server/auth'
import { getDb } from '~/.server/db'
import { parseQuery, runList } from '~/.server/list-query'
import { eventList, eventQuery, searchIsBroad, type EventQuery } from '~/.server/lists/events'
import type { RouteAccess } from '~/domain/permissions'
import type { Route } from './+types/api.events'

export const handle = { access: { loader: 'view:fleet' } satisfies RouteAccess }

export async function loader({ request }: Route.LoaderArgs) {
  await requireUser(request, 'view:fleet')
  const parsed = parseQuery(eventQuery, request)
  const db = getDb()
  const query: EventQuery = { ...parsed, broad: parsed.q ? searchIsBroad(db, parsed.q) : false }
  return Response.json(runList(db, eventList, query))
}
