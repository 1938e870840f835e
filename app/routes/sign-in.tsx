import { Form, redirect } from 'react-router'
import { authorize, getAuthenticator, userFromRequest } from '~/.server/auth'
import { methodNotAllowed, readFormData } from '~/.server/http'
import { returnToCookie } from '~/.server/sign-in'
import type { RouteAccess } from '~/domain/permissions'
import { safeReturnTo } from '~/utils/return-to'
import type { Route } from './+types/sign-in'

export const handle = { access: { loader: 'public', action: 'public' } satisfies RouteAccess }

export const meta: Route.MetaFunction = () => [{ title: 'Sign in · Ductkeeper' }]

export async function loader({ request }: Route.LoaderArgs) {
  const url = new URL(request.url)
  const returnTo = safeReturnTo(url.searchParams.get('returnTo'))
  if (await userFromRequest(request)) throw redirect(returnTo)
  return { returnTo, signedOut: url.searchParams.has('signed-out') }
}

export async function action({ request }: Route.ActionArgs) {
  if (request.method !== 'POST') return methodNotAllowed(request, ['POST'])
  await authorize(request, 'public')
  const form = await readFormData(request)
  const returnTo = safeReturnTo(String(form.get('returnTo') ?? '/'))
  // This action only ever starts a sign-in. The strategy takes a `state` in the address for the
  // provider's answer, so it is shown the bare path: a stray query cannot make it finish one here.
  const start = new Request(new URL(new URL(request.url).pathname, request.url), { method: 'POST', headers: request.headers })
  try {
    const auth = await getAuthenticator(start)
    await auth.authenticate('oidc', start)
  } catch (thrown) {
    // The strategy throws its redirect to the provider: add where to come back to.
    if (thrown instanceof Response && thrown.status >= 300 && thrown.status < 400) {
      thrown.headers.append('Set-Cookie', await returnToCookie.serialize(returnTo))
      throw thrown
    }
    console.error('sign-in could not start', thrown)
    return { error: 'The sign-in service could not be reached. Try again in a minute; if it persists, tell an administrator.' }
  }
  return { error: 'Sign-in did not start.' }
}

export default function SignIn({ loaderData, actionData }: Route.ComponentProps) {
  return (
    <main className="grid min-h-dvh place-items-center bg-rail px-4">
      <div className="w-full max-w-sm rounded-md bg-panel p-8 shadow-lg">
        <div className="flex items-center gap-2">
          <svg viewBox="0 0 32 32" className="size-7" aria-hidden="true">
            <rect width="32" height="32" rx="6" fill="#0e5a55" />
            <path d="M7 11h18v10H7z" fill="none" stroke="#d6e4e1" strokeWidth="2.4" />
            <circle cx="16" cy="16" r="3" fill="#e0a030" />
          </svg>
          <h1 className="text-xl font-semibold">Ductkeeper</h1>
        </div>
        <p className="mt-4 text-sm text-ink-soft">
          Sign in with your company account. Ductkeeper stores no passwords; your company&apos;s identity provider
          confirms who you are.
        </p>
        {loaderData.signedOut && (
          <p role="status" className="mt-4 rounded-sm bg-ok-soft px-3 py-2 text-sm text-ok">
            You are signed out.
          </p>
        )}
        {actionData?.error && (
          <p role="alert" className="mt-4 rounded-sm bg-late-soft px-3 py-2 text-sm text-late">
            {actionData.error}
          </p>
        )}
        <Form method="post" className="mt-6">
          <input type="hidden" name="returnTo" value={loaderData.returnTo} />
          <button
            type="submit"
            autoFocus
            className="w-full rounded-sm bg-accent px-4 py-2.5 font-medium text-accent-ink hover:bg-accent/90"
          >
            Sign in with company account
          </button>
        </Form>
      </div>
    </main>
  )
}
