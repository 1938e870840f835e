import { requireUser } from '~/.server/auth'
import { diagnoseRequest } from '~/domain/diagnose-schema'
import { diagnose } from '~/domain/loop'
import type { RouteAccess } from '~/domain/permissions'
import type { Route } from './+types/api.diagnose'

export const handle = { access: { action: 'record:work' } satisfies RouteAccess }

/** Live loop diagnosis as readings are typed: pure computation, nothing is stored. */
export async function action({ request }: Route.ActionArgs) {
  await requireUser(request, 'record:work')
  if (request.method !== 'POST') return Response.json({ error: 'Use POST.' }, { status: 405, headers: { Allow: 'POST' } })
  let body: unknown
  try {
    body = await request.json()
  } catch {
    return Response.json({ error: 'The body must be JSON.' }, { status: 400 })
  }
  const parsed = diagnoseRequest.safeParse(body)
  if (!parsed.success) {
    return Response.json({ error: 'Invalid request', issues: parsed.error.issues.map((i) => ({ path: i.path.join('.'), message: i.message })) }, { status: 400 })
  }
  const { arrangement, readings } = parsed.data
  return Response.json(diagnose(arrangement, readings))
}
