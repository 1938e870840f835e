import { requireUser } from '~/.server/auth'
import { undoRequest } from '~/.server/bulk/http'
import type { RouteAccess } from '~/domain/permissions'
import type { Route } from './+types/api.bulk.undo'

// Who may undo depends on the change (its author, or a lead or admin): checked in undoBulk.
export const handle = { access: { action: 'signed-in' } satisfies RouteAccess }

export async function action({ request }: Route.ActionArgs) {
  const user = await requireUser(request, 'signed-in')
  return undoRequest(request, user)
}
