import { requireUser } from '~/.server/auth'
import { getDb } from '~/.server/db'
import { listAnswers } from '~/.server/list-answers'
import type { RouteAccess } from '~/domain/permissions'
import type { Route } from './+types/api.devices'

export const handle = { access: { loader: 'view:fleet' } satisfies RouteAccess }

export async function loader({ request }: Route.LoaderArgs) {
  await requireUser(request, 'view:fleet')
  return Response.json(listAnswers['/api/devices'](getDb(), request))
}
