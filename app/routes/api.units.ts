import { requireUser } from '~/.server/auth'
import { getDb } from '~/.server/db'
import { parseQuery, runList } from '~/.server/list-query'
import { unitList, unitQuery } from '~/.server/lists/units'
import type { RouteAccess } from '~/domain/permissions'
import type { Route } from './+types/api.units'

export const handle = { access: { loader: 'view:fleet' } satisfies RouteAccess }

export async function loader({ request }: Route.LoaderArgs) {
  await requireUser(request, 'view:fleet')
  const query = parseQuery(unitQuery, request)
  return Response.json(runList(getDb(), unitList, query))
}
