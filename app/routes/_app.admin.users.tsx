import { data, Form, useNavigation } from 'react-router'
import { requireUser } from '~/.server/auth'
import { getDb } from '~/.server/db'
import { readFormData } from '~/.server/http'
import { changeRole, inviteUser, listUsers, Refusal, setActive } from '~/.server/repos/users'
import { StateBadge } from '~/components/state-badge'
import { buttonClass, Field, inputClass, Notice, PageHeader, quietButtonClass } from '~/components/ui/page-header'
import { fieldErrors, userAction } from '~/domain/admin-forms'
import { ROLE_KEYS, ROLE_LABELS, type RouteAccess } from '~/domain/permissions'
import type { Route } from './+types/_app.admin.users'

export const handle = { access: { loader: 'manage:users', action: 'manage:users' } satisfies RouteAccess }

export const meta: Route.MetaFunction = () => [{ title: 'Users · Ductkeeper' }]

export async function loader({ request }: Route.LoaderArgs) {
  const me = await requireUser(request, 'manage:users')
  return { users: listUsers(getDb()), meId: me.id }
}

export async function action({ request }: Route.ActionArgs) {
  const me = await requireUser(request, 'manage:users')
  const parsed = userAction.safeParse(Object.fromEntries(await readFormData(request)))
  if (!parsed.success) return data({ ok: false as const, errors: fieldErrors(parsed.error), message: null }, { status: 400 })
  const db = getDb()
  const input = parsed.data
  try {
    switch (input.intent) {
      case 'invite':
        inviteUser(db, me.id, input)
        return { ok: true as const, errors: {}, message: `Invited ${input.email} as ${ROLE_LABELS[input.role]}. They can sign in now.` }
      case 'change-role':
        changeRole(db, me.id, input.userId, input.role)
        return { ok: true as const, errors: {}, message: `Role changed to ${ROLE_LABELS[input.role]}; their open sessions were ended.` }
      case 'deactivate':
        setActive(db, me.id, input.userId, false)
        return { ok: true as const, errors: {}, message: 'Deactivated; their sessions and API tokens were revoked.' }
      case 'reactivate':
        setActive(db, me.id, input.userId, true)
        return { ok: true as const, errors: {}, message: 'Reactivated.' }
    }
  } catch (error) {
    if (error instanceof Refusal) return data({ ok: false as const, errors: {}, message: error.message }, { status: 409 })
    throw error
  }
}

export default function Users({ loaderData, actionData }: Route.ComponentProps) {
  const busy = useNavigation().state !== 'idle'
  const errors: Record<string, string> = actionData?.errors ?? {}
  return (
    <div className="mx-auto max-w-5xl">
      <PageHeader title="Users">{loaderData.users.filter((u) => u.active).length} active</PageHeader>
      {actionData?.message && <Notice tone={actionData.ok ? 'ok' : 'error'}>{actionData.message}</Notice>}

      <section aria-labelledby="invite-h" className="mb-6 rounded-md border border-line bg-panel p-4">
        <h2 id="invite-h" className="font-semibold">
          Invite someone
        </h2>
        <p className="mt-1 text-sm text-ink-soft">
          They sign in with their company account; the e-mail must match the one their identity provider gives.
        </p>
        <Form method="post" className="mt-3 flex flex-wrap items-start gap-3">
          <input type="hidden" name="intent" value="invite" />
          <Field label="E-mail" error={errors.email}>
            <input name="email" type="email" required className={`${inputClass} w-64`} placeholder="name@company.test" />
          </Field>
          <Field label="Name" error={errors.name}>
            <input name="name" required className={`${inputClass} w-48`} />
          </Field>
          <Field label="Role" error={errors.role}>
            <select name="role" className={inputClass} defaultValue="technician">
              {ROLE_KEYS.map((r) => (
                <option key={r} value={r}>
                  {ROLE_LABELS[r]}
                </option>
              ))}
            </select>
          </Field>
          <button type="submit" className={`${buttonClass} mt-5`} disabled={busy}>
            Invite
          </button>
        </Form>
      </section>

      <div className="overflow-x-auto rounded-md border border-line bg-panel">
        <table className="w-full text-sm">
          <thead className="text-left text-xs text-ink-faint uppercase">
            <tr>
              <th className="px-4 py-2 font-medium">Person</th>
              <th className="px-2 py-2 font-medium">Role</th>
              <th className="px-2 py-2 font-medium">Status</th>
              <th className="hidden px-2 py-2 font-medium md:table-cell">Last seen</th>
              <th className="px-4 py-2 text-right font-medium">Access</th>
            </tr>
          </thead>
          <tbody>
            {loaderData.users.map((u) => (
              <tr key={u.id} className="border-t border-line/70">
                <td className="px-4 py-2">
                  <div className="font-medium">
                    {u.name}
                    {u.id === loaderData.meId && <span className="ml-1 text-xs text-ink-faint">(you)</span>}
                  </div>
                  <div className="text-xs text-ink-faint">{u.email}</div>
                </td>
                <td className="px-2 py-2">
                  <Form method="post" className="flex items-center gap-2">
                    <input type="hidden" name="intent" value="change-role" />
                    <input type="hidden" name="userId" value={u.id} />
                    <select name="role" defaultValue={u.role} aria-label={`Role of ${u.name}`} className={`${inputClass} py-1`}>
                      {ROLE_KEYS.map((r) => (
                        <option key={r} value={r}>
                          {ROLE_LABELS[r]}
                        </option>
                      ))}
                    </select>
                    <button type="submit" className={quietButtonClass} disabled={busy}>
                      Change
                    </button>
                  </Form>
                </td>
                <td className="px-2 py-2">
                  <StateBadge value={u.active ? 'ok' : 'out-of-service'} label={u.active ? 'Active' : 'Deactivated'} />
                </td>
                <td className="hidden px-2 py-2 font-mono text-xs text-ink-soft md:table-cell">
                  {u.lastSeenAt ? u.lastSeenAt.slice(0, 16).replace('T', ' ') : 'never'}
                </td>
                <td className="px-4 py-2 text-right">
                  <Form method="post">
                    <input type="hidden" name="intent" value={u.active ? 'deactivate' : 'reactivate'} />
                    <input type="hidden" name="userId" value={u.id} />
                    <button type="submit" className={quietButtonClass} disabled={busy}>
                      {u.active ? 'Deactivate' : 'Reactivate'}
                    </button>
                  </Form>
                </td>
              </tr>
            ))}
          </tbody>
        </table>
      </div>
    </div>
  )
}
