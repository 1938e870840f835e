import { redirect } from 'react-router'
import { requireUser } from '~/.server/auth'
import { can, type RouteAccess } from '~/domain/permissions'
import { homeFor } from '~/utils/sections'
import type { Route } from './+types/_app._index'

// redirects: the route × role test expects a redirect home here, not a page.
export const handle = { access: { loader: 'view:fleet' } satisfies RouteAccess, redirects: true }

export async function loader({ request }: Route.LoaderArgs) {
  const user = await requireUser(request, 'view:fleet')
  throw redirect(homeFor(can(user.role, 'triage:fleet') || can(user.role, 'schedule:visits'), can(user.role, 'record:work')))
}
