import { redirect } from 'react-router'
import { writeAudit } from '~/.server/audit'
import { authorize, userFromRequest } from '~/.server/auth'
import { getDb } from '~/.server/db'
import { sessionStorage } from '~/.server/sessions'
import type { RouteAccess } from '~/domain/permissions'
import type { Route } from './+types/sign-out'

export const handle = { access: { action: 'public' } satisfies RouteAccess }

export async function action({ request }: Route.ActionArgs) {
  await authorize(request, 'public')
  const user = await userFromRequest(request)
  const session = await sessionStorage.getSession(request.headers.get('Cookie'))
  if (user) writeAudit(getDb(), { actorId: user.id, action: 'session.sign-out', entity: 'user', entityId: user.id })
  // destroySession revokes the server-side record too, so the old cookie is dead even if kept.
  throw redirect('/sign-in?signed-out', { headers: { 'Set-Cookie': await sessionStorage.destroySession(session) } })
}
