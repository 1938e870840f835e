import { requireUser } from '~/.server/auth'
import { getDb } from '~/.server/db'
import { parseQuery, runList } from '~/.server/list-query'
import { eventList, eventQuery, type EventListRow } from '~/.server/lists/events'
import type { RouteAccess } from '~/domain/permissions'
import type { Route } from './+types/api.events'

export const handle = { access: { loader: 'view:fleet' } satisfies RouteAccess }

export async function loader({ request }: Route.LoaderArgs) {
  await requireUser(request, 'view:fleet')
  const query = parseQuery(eventQuery, request)
  return Response.json(runList<typeof query, EventListRow>(getDb(), eventList, query))
}
