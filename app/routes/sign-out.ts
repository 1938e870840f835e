import { redirect } from 'react-router'
import { writeAudit } from '~/.server/audit'
import { authorize, providerSignOutUrl, SIGNED_OUT_PATH, userFromRequest } from '~/.server/auth'
import { getDb } from '~/.server/db'
import { sessionIdToken, sessionStorage } from '~/.server/sessions'
import type { RouteAccess } from '~/domain/permissions'
import type { Route } from './+types/sign-out'

export const handle = { access: { action: 'public' } satisfies RouteAccess }

export async function action({ request }: Route.ActionArgs) {
  await authorize(request, 'public')
  const user = await userFromRequest(request)
  const session = await sessionStorage.getSession(request.headers.get('Cookie'))
  const idToken = sessionIdToken(session.id)
  if (user) writeAudit(getDb(), { actorId: user.id, action: 'session.sign-out', entity: 'user', entityId: user.id })
  // destroySession revokes the server-side record too, so the old cookie is dead even if kept.
  const headers = { 'Set-Cookie': await sessionStorage.destroySession(session) }
  // A session from the provider ends there as well, or the next person at this browser would be
  // signed straight back in as this one. Someone with no session (a refused sign-in choosing another
  // account) is sent too, so the provider asks who is signing in next.
  const viaProvider = idToken || !user ? await providerSignOutUrl(request, idToken) : null
  throw redirect(viaProvider ?? SIGNED_OUT_PATH, { headers })
}
