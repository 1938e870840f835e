import { requireUser } from '~/.server/auth'
import { readJson } from '~/.server/http'
import { diagnoseRequest } from '~/domain/diagnose-schema'
import { diagnose } from '~/domain/loop'
import type { RouteAccess } from '~/domain/permissions'
import type { Route } from './+types/api.diagnose'

export const handle = { access: { action: 'record:work' } satisfies RouteAccess }

/** Live loop diagnosis as readings are typed: pure computation, nothing is stored. */
export async function action({ request }: Route.ActionArgs) {
  await requireUser(request, 'record:work')
  if (request.method !== 'POST') return Response.json({ error: 'Use POST.' }, { status: 405, headers: { Allow: 'POST' } })
  const { arrangement, readings } = await readJson(request, diagnoseRequest)
  return Response.json(diagnose(arrangement, readings))
}
