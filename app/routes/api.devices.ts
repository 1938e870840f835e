import { requireUser } from '~/.server/auth'
import { getDb } from '~/.server/db'
import { parseQuery, runList } from '~/.server/list-query'
import { deviceList, deviceQuery } from '~/.server/lists/devices'
import type { RouteAccess } from '~/domain/permissions'
import type { Route } from './+types/api.devices'

export const handle = { access: { loader: 'view:fleet' } satisfies RouteAccess }

export async function loader({ request }: Route.LoaderArgs) {
  await requireUser(request, 'view:fleet')
  const query = parseQuery(deviceQuery, request)
  return Response.json(runList(getDb(), deviceList, query))
}
