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
    return { ok: true, errors: {}, message: `Token “${input.name}” created. Copy it now: it will not be shown again.`, token }
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
      {actionData?.token && (
        <div className="mb-4 rounded-md border border-accent/40 bg-accent-soft p-3">
          <label htmlFor="new-token" className="text-xs font-medium text-ink-soft">
            New token (shown once)
          </label>
          <input
            id="new-token"
            readOnly
            value={actionData.token}
            onFocus={(e) => e.currentTarget.select()}
            className={`${inputClass} mt-1 w-full font-mono`}
          />
        </div>
      )}

      <section aria-labelledby="create-h" className="mb-6 rounded-md border border-line bg-panel p-4">
        <h2 id="create-h" className="font-semibold">
          Create a token
        </h2>
        <p className="mt-1 text-sm text-ink-soft">A token acts with its owner&apos;s role. Only its fingerprint is stored.</p>
        <Form method="post" className="mt-3 flex flex-wrap items-start gap-3">
          <input type="hidden" name="intent" value="create" />
          <Field label="Name" error={errors.name}>
            <input name="name" required className={`${inputClass} w-56`} placeholder="e.g. Nightly export" />
          </Field>
          <Field label="Acts as" error={errors.userId}>
            <select name="userId" className={`${inputClass} w-72`}>
              {loaderData.users.map((u) => (
                <option key={u.id} value={u.id}>
                  {u.label}
                </option>
              ))}
            </select>
          </Field>
          <Field label="Expires in (days)" error={errors.expiresInDays}>
            <input name="expiresInDays" type="number" min={1} max={366} defaultValue={90} className={`${inputClass} w-28`} />
          </Field>
          <button type="submit" className={`${buttonClass} mt-5`} disabled={busy}>
            Create
          </button>
        </Form>
      </section>

      <div className="overflow-x-auto rounded-md border border-line bg-panel">
        <table className="w-full text-sm">
          <thead className="text-left text-xs text-ink-faint uppercase">
            <tr>
              <th className="px-4 py-2 font-medium">Token</th>
              <th className="px-2 py-2 font-medium">Acts as</th>
              <th className="px-2 py-2 font-medium">Expires</th>
              <th className="hidden px-2 py-2 font-medium md:table-cell">Last used</th>
              <th className="px-2 py-2 font-medium">Status</th>
              <th className="px-4 py-2" />
            </tr>
          </thead>
          <tbody>
            {loaderData.tokens.length === 0 && (
              <tr>
                <td colSpan={6} className="px-4 py-6 text-center text-ink-soft">
                  No tokens yet.
                </td>
              </tr>
            )}
            {loaderData.tokens.map((t) => {
              const expired = t.expiresAt <= loaderData.now
              const status = t.revokedAt ? 'Revoked' : expired ? 'Expired' : 'Active'
              return (
                <tr key={t.id} className="border-t border-line/70">
                  <td className="px-4 py-2">
                    <div className="font-medium">{t.name}</div>
                    <div className="font-mono text-xs text-ink-faint">dk_{t.prefix}_…</div>
                  </td>
                  <td className="px-2 py-2 text-ink-soft">{t.userEmail}</td>
                  <td className="px-2 py-2 font-mono text-xs">{t.expiresAt.slice(0, 10)}</td>
                  <td className="hidden px-2 py-2 font-mono text-xs md:table-cell">{t.lastUsedAt?.slice(0, 16).replace('T', ' ') ?? 'never'}</td>
                  <td className="px-2 py-2">
                    <StateBadge value={status === 'Active' ? 'ok' : 'out-of-service'} label={status} />
                  </td>
                  <td className="px-4 py-2 text-right">
                    {status === 'Active' && (
                      <Form method="post">
                        <input type="hidden" name="intent" value="revoke" />
                        <input type="hidden" name="tokenId" value={t.id} />
                        <button type="submit" className={quietButtonClass} disabled={busy}>
                          Revoke
                        </button>
                      </Form>
                    )}
                  </td>
                </tr>
              )
            })}
          </tbody>
        </table>
      </div>
    </div>
  )
}
