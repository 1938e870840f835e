import { requireUser } from '~/.server/auth'
import { undoRequest } from '~/.server/bulk/http'
import { methodNotAllowed } from '~/.server/http'
import type { RouteAccess } from '~/domain/permissions'
import type { Route } from './+types/api.bulk.undo'

// Who may undo depends on the change (its author, or a lead or admin): checked in undoBulk.
// Served only by POST; `methods` tells the route × role test that a GET answers 405.
export const handle = { access: { loader: 'signed-in', action: 'signed-in' } satisfies RouteAccess, methods: ['POST'] as const }

/** A GET is refused as a method the route does not serve, not as a malformed undo. */
export async function loader({ request }: Route.LoaderArgs) {
  await requireUser(request, 'signed-in')
  return methodNotAllowed(request, handle.methods)
}

export async function action({ request }: Route.ActionArgs) {
  const user = await requireUser(request, 'signed-in')
  if (request.method !== 'POST') return methodNotAllowed(request, handle.methods)
  return undoRequest(request, user)
}
