import { useRef, useState } from 'react'
import { data, Form, useNavigation } from 'react-router'
import { requireUser } from '~/.server/auth'
import { getDb } from '~/.server/db'
import { readFormData } from '~/.server/http'
import { createToken, listTokens, revokeToken } from '~/.server/repos/tokens'
import { listUsers } from '~/.server/repos/users'
import { StateBadge } from '~/components/state-badge'
import { buttonClass, Field, inputClass, Notice, PageHeader, quietButtonClass } from '~/components/ui/page-header'
import { fieldErrors, tokenAction } from '~/domain/admin-forms'
import type { RouteAccess } from '~/domain/permissions'
import type { Route } from './+types/_app.admin.tokens'

export const handle = { access: { loader: 'manage:tokens', action: 'manage:tokens' } satisfies RouteAccess }

export const meta: Route.MetaFunction = () => [{ title: 'API tokens · Ductkeeper' }]

export async function loader({ request }: Route.LoaderArgs) {
  await requireUser(request, 'manage:tokens')
  const db = getDb()
  return {
    tokens: listTokens(db),
    users: listUsers(db).filter((u) => u.active).map((u) => ({ id: u.id, label: `${u.name} (${u.email})` })),
    now: new Date().toISOString(),
  }
}

export async function action({ request }: Route.ActionArgs) {
  const me = await requireUser(request, 'manage:tokens')
  const parsed = tokenAction.safeParse(Object.fromEntries(await readFormData(request)))
  if (!parsed.success) return data({ ok: false, errors: fieldErrors(parsed.error), message: null, token: null }, { status: 400 })
  const db = getDb()
  const input = parsed.data
  if (input.intent === 'create') {
    const owner = db.$client.prepare('select 1 from users where id = ? and active = 1').get(input.userId)
    if (!owner) return data({ ok: false, errors: { userId: 'Choose an active user' }, message: null, token: null }, { status: 400 })
    const expiresAt = new Date(Date.now() + input.expiresInDays * 86_400_000)
    const { token } = createToken(db, { userId: input.userId, name: input.name, expiresAt, actorId: me.id })
    return { ok: true, errors: {}, message: `Token “${input.name}” created.`, token }
  }
  const revoked = revokeToken(db, input.tokenId, me.id)
  if (!revoked) return data({ ok: false, errors: {}, message: 'That token is already revoked or does not exist.', token: null }, { status: 409 })
  return { ok: true, errors: {}, message: 'Token revoked. Calls with it are refused from now on.', token: null }
}

export default function Tokens({ loaderData, actionData }: Route.ComponentProps) {
  const busy = useNavigation().state !== 'idle'
  const errors: Record<string, string> = actionData?.errors ?? {}
  return (
    <div className="mx-auto max-w-5xl">
      <PageHeader title="API tokens">For scripts and integrations: send as Authorization: Bearer …</PageHeader>
      {actionData?.message && <Notice tone={actionData.ok ? 'ok' : 'error'}>{actionData.message}</Notice>}
      {actionData?.token && <NewToken token={actionData.token} />}

      <section aria-labelledby="create-h" className="mb-6 rounded-md border border-line bg-panel p-4">
        <h2 id="create-h" className="font-semibold">
          Create a token
        </h2>
        <p className="mt-1 text-sm text-ink-soft">A token acts with its owner&apos;s role. Only its fingerprint is stored.</p>
        {/* A new key after each created token empties the form for the next one. */}
        <Form key={actionData?.token ?? 'form'} method="post" className="mt-3 grid gap-3 sm:flex sm:flex-wrap sm:items-start">
          <input type="hidden" name="intent" value="create" />
          <Field label="Name" error={errors.name}>
            <input name="name" required className={`${inputClass} w-full sm:w-56`} placeholder="e.g. Nightly export" />
          </Field>
          <Field label="Acts as" error={errors.userId}>
            <select name="userId" className={`${inputClass} w-full sm:w-72`}>
              {loaderData.users.map((u) => (
                <option key={u.id} value={u.id}>
                  {u.label}
                </option>
              ))}
            </select>
          </Field>
          <Field label="Expires in (days)" error={errors.expiresInDays}>
            <input name="expiresInDays" type="number" min={1} max={366} defaultValue={90} className={`${inputClass} w-full sm:w-28`} />
          </Field>
          <button type="submit" className={`${buttonClass} justify-self-start sm:mt-5`} disabled={busy}>
            Create
          </button>
        </Form>
      </section>

      {loaderData.tokens.length === 0 ? (
        <p className="rounded-md border border-line bg-panel px-4 py-6 text-center text-ink-soft">No tokens yet.</p>
      ) : (
        <ul aria-label="Tokens" className="divide-y divide-line/70 rounded-md border border-line bg-panel">
          {loaderData.tokens.map((t) => {
            const expired = t.expiresAt <= loaderData.now
            const status = t.revokedAt ? 'Revoked' : expired ? 'Expired' : 'Active'
            return (
              <li key={t.id} className="grid gap-2 px-4 py-3 text-sm md:grid-cols-[minmax(0,1fr)_minmax(0,14rem)_8rem_6rem_auto] md:items-center">
                <div className="min-w-0">
                  <div className="font-medium">{t.name}</div>
                  <div className="font-mono text-xs text-ink-faint">dk_{t.prefix}_…</div>
                </div>
                <div className="min-w-0 truncate text-ink-soft">
                  <span className="text-xs text-ink-faint md:hidden">Acts as </span>
                  {t.userEmail}
                </div>
                <div className="text-xs text-ink-soft">
                  <div>
                    {status === 'Active' ? 'Expires' : 'Expired'} <span className="font-mono">{t.expiresAt.slice(0, 10)}</span>
                  </div>
                  <div>
                    Used <span className="font-mono">{t.lastUsedAt?.slice(0, 16).replace('T', ' ') ?? 'never'}</span>
                  </div>
                </div>
                <div>
                  <StateBadge value={status === 'Active' ? 'ok' : 'out-of-service'} label={status} />
                </div>
                <div className="md:text-right">
                  {status === 'Active' && (
                    <Form method="post">
                      <input type="hidden" name="intent" value="revoke" />
                      <input type="hidden" name="tokenId" value={t.id} />
                      <button type="submit" className={quietButtonClass} disabled={busy} aria-label={`Revoke ${t.name}`}>
                        Revoke
                      </button>
                    </Form>
                  )}
                </div>
              </li>
            )
          })}
        </ul>
      )}
    </div>
  )
}

/**
 * The token's text, shown this once: only its fingerprint is kept. Copy uses the clipboard where the
 * browser allows it (secure pages); elsewhere the text is selected for Ctrl+C.
 */
function NewToken({ token }: { token: string }) {
  const input = useRef<HTMLInputElement>(null)
  const [status, setStatus] = useState<'idle' | 'copied' | 'selected'>('idle')
  const copy = async () => {
    try {
      if (!navigator.clipboard) throw new Error('no clipboard')
      await navigator.clipboard.writeText(token)
      setStatus('copied')
    } catch {
      input.current?.focus()
      input.current?.select()
      setStatus('selected')
    }
  }
  return (
    <div className="mb-4 rounded-md border border-accent/40 bg-accent-soft p-3">
      <label htmlFor="new-token" className="text-sm font-medium">
        Your new token
      </label>
      <p className="text-xs text-ink-soft">Shown once: copy it now and keep it somewhere safe. Ductkeeper stores only a fingerprint, so it cannot show it again.</p>
      <div className="mt-2 flex flex-col gap-2 sm:flex-row">
        <input
          id="new-token"
          ref={input}
          readOnly
          value={token}
          onFocus={(e) => e.currentTarget.select()}
          className={`${inputClass} min-w-0 flex-1 font-mono text-xs`}
        />
        <button type="button" onClick={() => void copy()} className={`${buttonClass} shrink-0`}>
          {status === 'copied' ? 'Copied' : 'Copy token'}
        </button>
      </div>
      <p role="status" className={`text-xs text-ink-soft ${status === 'idle' ? '' : 'mt-1'}`}>
        {status === 'copied' ? 'Copied to the clipboard.' : status === 'selected' ? 'Selected: press Ctrl+C (⌘C on a Mac) to copy.' : ''}
      </p>
    </div>
  )
}
