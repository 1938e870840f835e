import { authorize } from '~/.server/auth'
import type { RouteAccess } from '~/domain/permissions'
import type { Route } from './+types/api.$'

// Any address under /api/ that no route serves. Public: whether an address exists tells no one
// anything, and a client that mistyped a path learns so whether or not it is signed in.
export const handle = { access: { loader: 'public', action: 'public' } satisfies RouteAccess }

/**
 * An API client is told in JSON, in the shape of every other refusal, that nothing answers at this
 * address (the framework's own answer is an HTML page), logged in one line.
 */
function notFound(request: Request): Response {
  const { pathname } = new URL(request.url)
  console.warn(`${request.method} ${pathname} 404: no API route`)
  return Response.json({ error: `Nothing answers at ${pathname}; check the address.` }, { status: 404 })
}

export async function loader({ request }: Route.LoaderArgs) {
  return notFound(request)
}

export async function action({ request }: Route.ActionArgs) {
  // A write from another site is refused as on every other action, before anything is said.
  await authorize(request, 'public')
  return notFound(request)
}
