import { requireUser } from '~/.server/auth'
import { getDb } from '~/.server/db'
import { parseQuery, runList } from '~/.server/list-query'
import { customerList, customerQuery } from '~/.server/lists/customers'
import type { RouteAccess } from '~/domain/permissions'
import type { Route } from './+types/api.customers'

export const handle = { access: { loader: 'view:fleet' } satisfies RouteAccess }

export async function loader({ request }: Route.LoaderArgs) {
  await requireUser(request, 'view:fleet')
  const query = parseQuery(customerQuery, request)
  return Response.json(runList(getDb(), customerList, query))
}
