import { requireUser } from '~/.server/auth'
import { capabilitiesOf, type RouteAccess } from '~/domain/permissions'
import type { Route } from './+types/api.me'

export const handle = { access: { loader: 'signed-in' } satisfies RouteAccess }

/** Who the caller is and what they may do: lets a script check its token before it starts. */
export async function loader({ request }: Route.LoaderArgs) {
  const user = await requireUser(request, 'signed-in')
  return Response.json({
    user: { id: user.id, email: user.email, name: user.name, role: user.role },
    via: user.via,
    capabilities: capabilitiesOf(user.role),
  })
}
