import { requireUser } from '~/.server/auth'
import { methodNotAllowed, readJson } from '~/.server/http'
import { diagnoseRequest } from '~/domain/diagnose-schema'
import { diagnose } from '~/domain/loop'
import type { RouteAccess } from '~/domain/permissions'
import type { Route } from './+types/api.diagnose'

// Served only by POST; `methods` tells the route × role test that a GET answers 405.
export const handle = { access: { loader: 'record:work', action: 'record:work' } satisfies RouteAccess, methods: ['POST'] as const }

/** A GET is refused as a method the route does not serve, not as a missing loader. */
export async function loader({ request }: Route.LoaderArgs) {
  await requireUser(request, 'record:work')
  return methodNotAllowed(request, handle.methods)
}

/** Live loop diagnosis as readings are typed: pure computation, nothing is stored. */
export async function action({ request }: Route.ActionArgs) {
  await requireUser(request, 'record:work')
  if (request.method !== 'POST') return methodNotAllowed(request, handle.methods)
  const { arrangement, readings } = await readJson(request, diagnoseRequest)
  return Response.json(diagnose(arrangement, readings))
}
