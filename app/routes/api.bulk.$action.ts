import { requireUser } from '~/.server/auth'
import { bulkRequest } from '~/.server/bulk/http'
import type { RouteAccess } from '~/domain/permissions'
import type { Route } from './+types/api.bulk.$action'

// Each action names its own capability (checked in bulkRequest); the route only needs a signed-in user.
export const handle = { access: { action: 'signed-in' } satisfies RouteAccess }

export async function action({ request, params }: Route.ActionArgs) {
  const user = await requireUser(request, 'signed-in')
  return bulkRequest(request, params.action, user)
}
