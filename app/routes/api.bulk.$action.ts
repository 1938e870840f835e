import { requireUser } from '~/.server/auth'
import { bulkRequest } from '~/.server/bulk/http'
import { methodNotAllowed } from '~/.server/http'
import type { RouteAccess } from '~/domain/permissions'
import type { Route } from './+types/api.bulk.$action'

// Each action names its own capability (checked in bulkRequest); the route only needs a signed-in user.
// Served only by POST; `methods` tells the route × role test that a GET answers 405.
export const handle = { access: { loader: 'signed-in', action: 'signed-in' } satisfies RouteAccess, methods: ['POST'] as const }

/** A GET is refused as a method the route does not serve, not as a malformed change. */
export async function loader({ request }: Route.LoaderArgs) {
  await requireUser(request, 'signed-in')
  return methodNotAllowed(request, handle.methods)
}

export async function action({ request, params }: Route.ActionArgs) {
  const user = await requireUser(request, 'signed-in')
  if (request.method !== 'POST') return methodNotAllowed(request, handle.methods)
  return bulkRequest(request, params.action, user)
}
