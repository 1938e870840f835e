import { data, Form, redirect } from 'react-router'
import { writeAudit } from '~/.server/audit'
import { getAuthenticator } from '~/.server/auth'
import { getDb } from '~/.server/db'
import { sessionStorage } from '~/.server/sessions'
import { auditRefusedSignIn, clearOAuthCookies, readReturnTo, returnToCookie } from '~/.server/sign-in'
import type { RouteAccess } from '~/domain/permissions'
import type { Route } from './+types/auth.callback'

export const handle = { access: { loader: 'public' } satisfies RouteAccess }

export const meta: Route.MetaFunction = () => [{ title: 'Sign-in refused · Ductkeeper' }]

export async function loader({ request }: Route.LoaderArgs) {
  const headers = new Headers()
  for (const c of clearOAuthCookies(request)) headers.append('Set-Cookie', c)
  headers.append('Set-Cookie', await returnToCookie.serialize('', { maxAge: 0 }))

  let email: string
  let idToken: string | null
  try {
    const auth = await getAuthenticator(request)
    ;({ email, idToken } = await auth.authenticate('oidc', request))
  } catch (error) {
    console.warn('sign-in callback refused:', error instanceof Error ? error.message : error)
    auditRefusedSignIn(getDb(), { reason: 'failed', email: null, userId: null })
    return data(
      { reason: 'failed' as const, email: null },
      { status: 400, headers },
    )
  }

  const db = getDb()
  const user = db.$client.prepare('select id, active from users where lower(email) = ?').get(email) as
    | { id: number; active: number }
    | undefined
  if (!user || !user.active) {
    auditRefusedSignIn(db, { reason: user ? 'inactive' : 'unknown', email, userId: user?.id ?? null })
    return data({ reason: user ? ('inactive' as const) : ('unknown' as const), email }, { status: 403, headers })
  }
  const session = await sessionStorage.getSession()
  session.set('userId', user.id)
  if (idToken) session.set('idToken', idToken)
  headers.append('Set-Cookie', await sessionStorage.commitSession(session))
  writeAudit(db, { actorId: user.id, action: 'session.sign-in', entity: 'user', entityId: user.id })
  throw redirect(await readReturnTo(request), { headers })
}

const MESSAGES = {
  failed: 'The sign-in could not be completed: it may have expired, been used already, or been cancelled. Start again.',
  unknown: 'is not set up in Ductkeeper. Ask an administrator to invite you.',
  inactive: 'has been deactivated in Ductkeeper. Ask an administrator if you still need access.',
}

export default function Refused({ loaderData }: Route.ComponentProps) {
  return (
    <main className="grid min-h-dvh place-items-center bg-rail px-4">
      <div className="w-full max-w-md rounded-md bg-panel p-8 shadow-lg">
        <h1 className="text-xl font-semibold">Sign-in refused</h1>
        <p role="alert" className="mt-3 text-ink-soft">
          {loaderData.email ? (
            <>
              The account <strong className="text-ink">{loaderData.email}</strong> {MESSAGES[loaderData.reason]}
            </>
          ) : (
            MESSAGES.failed
          )}
        </p>
        {loaderData.email ? (
          // The provider still holds this person's session: end it there so it asks who signs in next.
          <Form method="post" action="/sign-out" className="mt-6">
            <button type="submit" className="rounded-sm bg-accent px-4 py-2 text-accent-ink">
              Sign in with another account
            </button>
          </Form>
        ) : (
          <a href="/sign-in" className="mt-6 inline-block rounded-sm bg-accent px-4 py-2 text-accent-ink">
            Back to sign-in
          </a>
        )}
      </div>
    </main>
  )
}
