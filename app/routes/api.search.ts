import { z } from 'zod'
import { requireUser } from '~/.server/auth'
import { getDb } from '~/.server/db'
import { parseQuery } from '~/.server/list-query'
import { search } from '~/.server/repos/search'
import type { RouteAccess } from '~/domain/permissions'
import type { Route } from './+types/api.search'

// sampleQuery: what the route × role test sends to reach the loader with valid input.
export const handle = { access: { loader: 'view:fleet' } satisfies RouteAccess, sampleQuery: 'q=rtu' }

const searchQuery = z.object({
  q: z.string({ error: 'Type something to search for' }).trim().min(1, 'Type something to search for').max(100),
})

/** The command palette: customers, sites, units and detectors matching the words typed, best first. */
export async function loader({ request }: Route.LoaderArgs) {
  await requireUser(request, 'view:fleet')
  const { q } = parseQuery(searchQuery, request)
  return Response.json(search(getDb(), q))
}
