import { useEffect, useRef, useState } from 'react'
import { data, Form, useNavigation } from 'react-router'
import { requireUser } from '~/.server/auth'
import { getDb } from '~/.server/db'
import { readFormData } from '~/.server/http'
import { changeRole, inviteUser, listUsers, Refusal, setActive, setWorkload } from '~/.server/repos/users'
import { StateBadge } from '~/components/state-badge'
import { buttonClass, Field, inputClass, Notice, PageHeader, quietButtonClass } from '~/components/ui/page-header'
import { fieldErrors, userAction } from '~/domain/admin-forms'
import { calendarFor } from '~/domain/calendar'
import { ROLE_KEYS, ROLE_LABELS, type RouteAccess } from '~/domain/permissions'
import type { Route } from './+types/_app.admin.users'

export const handle = { access: { loader: 'manage:users', action: 'manage:users' } satisfies RouteAccess }

export const meta: Route.MetaFunction = () => [{ title: 'Users · Ductkeeper' }]

export async function loader({ request }: Route.LoaderArgs) {
  const me = await requireUser(request, 'manage:users')
  return { users: listUsers(getDb()), meId: me.id }
}

/** Region codes the holiday calendar does not know: the planner could not book working days there. */
function unknownRegions(regions: string[]): string[] {
  return regions.filter((r) => {
    try {
      calendarFor(r)
      return false
    } catch {
      return true
    }
  })
}

type Answer = { ok: boolean; errors: Record<string, string>; message: string | null; userId: number | null }
const answer = (a: Answer, status = 200) => data(a, { status })

export async function action({ request }: Route.ActionArgs) {
  const me = await requireUser(request, 'manage:users')
  const form = Object.fromEntries(await readFormData(request))
  const userId = Number(form.userId) || null
  const parsed = userAction.safeParse(form)
  if (!parsed.success) return answer({ ok: false, errors: fieldErrors(parsed.error), message: 'Check the highlighted fields.', userId }, 400)
  const db = getDb()
  const input = parsed.data
  try {
    switch (input.intent) {
      case 'invite':
        inviteUser(db, me.id, input)
        return answer({ ok: true, errors: {}, message: `Invited ${input.email} as ${ROLE_LABELS[input.role]}. They can sign in now.`, userId: null })
      case 'change-role':
        changeRole(db, me.id, input.userId, input.role)
        return answer({ ok: true, errors: {}, message: `Role changed to ${ROLE_LABELS[input.role]}; their open sessions were ended.`, userId })
      case 'deactivate':
        setActive(db, me.id, input.userId, false)
        return answer({ ok: true, errors: {}, message: 'Deactivated; their sessions and API tokens were revoked.', userId })
      case 'reactivate':
        setActive(db, me.id, input.userId, true)
        return answer({ ok: true, errors: {}, message: 'Reactivated.', userId })
      case 'workload': {
        const unknown = unknownRegions(input.regions)
        if (unknown.length) {
          const message = `${unknown.join(', ')}: no such region known to the holiday calendar`
          return answer({ ok: false, errors: { regions: message }, message: 'Check the highlighted fields.', userId }, 400)
        }
        const changed = setWorkload(db, me.id, input.userId, input)
        return answer({ ok: true, errors: {}, message: changed ? 'Regions and daily capacity saved.' : 'Nothing changed.', userId })
      }
    }
  } catch (error) {
    if (error instanceof Refusal) return answer({ ok: false, errors: {}, message: error.message, userId }, 409)
    throw error
  }
}

type UserRow = Route.ComponentProps['loaderData']['users'][number]

export default function Users({ loaderData, actionData }: Route.ComponentProps) {
  const busy = useNavigation().state !== 'idle'
  const [confirming, setConfirming] = useState<UserRow | null>(null)
  const rowErrors = (id: number): Record<string, string> => (actionData && actionData.userId === id ? actionData.errors : {})
  const inviteErrors: Record<string, string> = actionData && actionData.userId === null ? actionData.errors : {}
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
        <Form method="post" className="mt-3 grid gap-3 sm:flex sm:flex-wrap sm:items-start">
          <input type="hidden" name="intent" value="invite" />
          <Field label="E-mail" error={inviteErrors.email}>
            <input name="email" type="email" required className={`${inputClass} w-full sm:w-64`} placeholder="name@company.test" />
          </Field>
          <Field label="Name" error={inviteErrors.name}>
            <input name="name" required className={`${inputClass} w-full sm:w-48`} />
          </Field>
          <Field label="Role" error={inviteErrors.role}>
            <select name="role" className={inputClass} defaultValue="technician">
              {ROLE_KEYS.map((r) => (
                <option key={r} value={r}>
                  {ROLE_LABELS[r]}
                </option>
              ))}
            </select>
          </Field>
          <button type="submit" className={`${buttonClass} justify-self-start sm:mt-5`} disabled={busy}>
            Invite
          </button>
        </Form>
      </section>

      <ul aria-label="People" className="divide-y divide-line/70 rounded-md border border-line bg-panel">
        {loaderData.users.map((u) => (
          <UserItem key={u.id} u={u} me={u.id === loaderData.meId} busy={busy} errors={rowErrors(u.id)} onDeactivate={() => setConfirming(u)} />
        ))}
      </ul>
      <ConfirmDeactivate user={confirming} busy={busy} onClose={() => setConfirming(null)} />
    </div>
  )
}

function UserItem({ u, me, busy, errors, onDeactivate }: { u: UserRow; me: boolean; busy: boolean; errors: Record<string, string>; onDeactivate: () => void }) {
  const regions = u.regions ? u.regions.split(',') : []
  const coverageErrors = Boolean(errors.regions || errors.dailyCapacity || errors.capacityUnit)
  return (
    <li id={`user-${u.id}`} className="scroll-mt-20 px-4 py-3 target:bg-accent-soft/40">
      <div className="grid gap-3 md:grid-cols-[minmax(0,1fr)_auto_11rem_auto] md:items-center">
        <div className="min-w-0">
          <div className="font-medium">
            {u.name}
            {me && <span className="ml-1 text-xs text-ink-faint">(you)</span>}
          </div>
          <div className="truncate text-xs text-ink-faint">{u.email}</div>
        </div>
        <Form method="post" className="flex items-center gap-2">
          <input type="hidden" name="intent" value="change-role" />
          <input type="hidden" name="userId" value={u.id} />
          <select name="role" defaultValue={u.role} aria-label={`Role of ${u.name}`} className={`${inputClass} min-w-0 flex-1 py-1 md:flex-none`}>
            {ROLE_KEYS.map((r) => (
              <option key={r} value={r}>
                {ROLE_LABELS[r]}
              </option>
            ))}
          </select>
          <button type="submit" className={quietButtonClass} disabled={busy} aria-label={`Change role of ${u.name}`}>
            Change
          </button>
        </Form>
        <div className="flex flex-wrap items-center gap-x-3 gap-y-1 md:flex-col md:items-start md:gap-0.5">
          <StateBadge value={u.active ? 'ok' : 'out-of-service'} label={u.active ? 'Active' : 'Deactivated'} />
          <span className="font-mono text-xs whitespace-nowrap text-ink-faint">seen {u.lastSeenAt ? u.lastSeenAt.slice(0, 16).replace('T', ' ') : 'never'}</span>
        </div>
        <div className="md:text-right">
          {u.active ? (
            <button type="button" className={`${quietButtonClass} disabled:cursor-not-allowed disabled:opacity-50`} disabled={busy || me} onClick={onDeactivate} title={me ? 'You cannot deactivate yourself here' : undefined}>
              Deactivate
            </button>
          ) : (
            <Form method="post">
              <input type="hidden" name="intent" value="reactivate" />
              <input type="hidden" name="userId" value={u.id} />
              <button type="submit" className={quietButtonClass} disabled={busy}>
                Reactivate
              </button>
            </Form>
          )}
        </div>
      </div>
      {u.role === 'technician' && (
        <details className="mt-2" open={coverageErrors || undefined}>
          <summary className="cursor-pointer text-xs text-ink-soft select-none hover:text-ink">
            Covers {regions.length ? regions.join(', ') : 'no regions yet'} ·{' '}
            {u.dailyCapacity ? `${u.dailyCapacity} ${u.capacityUnit} a day` : 'no daily capacity set'}
          </summary>
          <Form method="post" className="mt-2 grid gap-3 sm:flex sm:flex-wrap sm:items-start" aria-label={`Coverage of ${u.name}`}>
            <input type="hidden" name="intent" value="workload" />
            <input type="hidden" name="userId" value={u.id} />
            <Field label="Regions (ISO 3166-2, comma separated)" error={errors.regions}>
              <input name="regions" defaultValue={regions.join(', ')} placeholder="US-OR, US-WA" className={`${inputClass} w-full sm:w-72`} aria-invalid={errors.regions ? true : undefined} />
            </Field>
            <Field label="Daily capacity" error={errors.dailyCapacity}>
              <input name="dailyCapacity" inputMode="numeric" defaultValue={u.dailyCapacity ?? ''} className={`${inputClass} w-full sm:w-24`} aria-invalid={errors.dailyCapacity ? true : undefined} />
            </Field>
            <Field label="Counted in" error={errors.capacityUnit}>
              <select name="capacityUnit" defaultValue={u.capacityUnit} className={inputClass}>
                <option value="detectors">detectors</option>
                <option value="visits">visits</option>
              </select>
            </Field>
            <button type="submit" className={`${buttonClass} justify-self-start sm:mt-5`} disabled={busy}>
              Save coverage
            </button>
          </Form>
        </details>
      )}
    </li>
  )
}

/** Asks before cutting someone off: deactivating ends their sessions and revokes their API tokens. */
function ConfirmDeactivate({ user, busy, onClose }: { user: UserRow | null; busy: boolean; onClose: () => void }) {
  const ref = useRef<HTMLDialogElement>(null)
  useEffect(() => {
    const dialog = ref.current
    if (!dialog) return
    if (user && !dialog.open) dialog.showModal()
    if (!user && dialog.open) dialog.close()
  }, [user])
  return (
    <dialog
      ref={ref}
      aria-labelledby="deactivate-h"
      onClose={onClose}
      className="m-auto w-[min(28rem,calc(100vw-2rem))] rounded-md border border-line-strong bg-panel p-5 text-ink shadow-2xl backdrop:bg-ink/30"
    >
      {user && (
        <Form method="post" onSubmit={() => ref.current?.close()}>
          <input type="hidden" name="intent" value="deactivate" />
          <input type="hidden" name="userId" value={user.id} />
          <h2 id="deactivate-h" className="text-lg font-semibold">
            Deactivate {user.name}?
          </h2>
          <p className="mt-2 text-sm text-ink-soft">
            {user.name} ({user.email}) is signed out everywhere at once and their API tokens stop working. You can reactivate them
            later; tokens stay revoked.
          </p>
          <div className="mt-5 flex justify-end gap-2">
            <button type="button" autoFocus className={quietButtonClass} onClick={() => ref.current?.close()}>
              Keep active
            </button>
            <button type="submit" className="rounded-sm bg-late px-3 py-1.5 text-sm font-medium text-white hover:bg-late/90 disabled:opacity-50" disabled={busy}>
              Deactivate {user.name}
            </button>
          </div>
        </Form>
      )}
    </dialog>
  )
}
