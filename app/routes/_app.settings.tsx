import { data, Form, useNavigation } from 'react-router'
import { z } from 'zod'
import { requireUser } from '~/.server/auth'
import { writeAudit } from '~/.server/audit'
import { getDb, writeTx } from '~/.server/db'
import { readFormData } from '~/.server/http'
import { buttonClass, Field, inputClass, Notice, PageHeader } from '~/components/ui/page-header'
import type { RouteAccess } from '~/domain/permissions'
import type { Route } from './+types/_app.settings'

export const handle = { access: { loader: 'receive:digest', action: 'receive:digest' } satisfies RouteAccess }

export const meta: Route.MetaFunction = () => [{ title: 'Settings · Ductkeeper' }]

const WEEKDAYS = ['Monday', 'Tuesday', 'Wednesday', 'Thursday', 'Friday', 'Saturday', 'Sunday']

function settingsOf(userId: number) {
  const c = getDb().$client
  const s = c.prepare('select enabled, weekday, hour from digest_settings where user_id = ?').get(userId) as { enabled: number; weekday: number; hour: number } | undefined
  const followed = c.prepare('select customer_id from digest_customers where user_id = ? order by customer_id').pluck().all(userId) as number[]
  return { enabled: s ? s.enabled === 1 : true, weekday: s?.weekday ?? 1, hour: s?.hour ?? 7, customerIds: followed }
}

export async function loader({ request }: Route.LoaderArgs) {
  const me = await requireUser(request, 'receive:digest')
  const c = getDb().$client
  const customers = c.prepare('select id, name from customers order by name').all() as { id: number; name: string }[]
  // This person's latest digest, found on the outbox's key index (digest:<user>:<ISO week>).
  const last = c
    .prepare(`select subject, status, sent_at as sentAt from email_outbox where idempotency_key > ? and idempotency_key < ? order by idempotency_key desc limit 1`)
    .get(`digest:${me.id}:`, `digest:${me.id};`) as { subject: string; status: string; sentAt: string | null } | undefined
  return { settings: settingsOf(me.id), customers, email: me.email, last: last ?? null }
}

const settingsForm = z.object({
  enabled: z.literal('on').optional(),
  weekday: z.coerce.number().int().min(1, 'Pick a weekday').max(7, 'Pick a weekday'),
  hour: z.coerce.number().int().min(0, 'An hour from 0 to 23').max(23, 'An hour from 0 to 23'),
  customerIds: z.array(z.coerce.number().int().positive()).max(500),
})

export async function action({ request }: Route.ActionArgs) {
  const me = await requireUser(request, 'receive:digest')
  const form = await readFormData(request)
  const parsed = settingsForm.safeParse({ ...Object.fromEntries(form), customerIds: form.getAll('customerIds') })
  if (!parsed.success) return data({ ok: false, message: parsed.error.issues[0]?.message ?? 'Check the fields' }, { status: 400 })
  const db = getDb()
  const c = db.$client
  const known = new Set(c.prepare('select id from customers').pluck().all() as number[])
  if (parsed.data.customerIds.some((id) => !known.has(id))) return data({ ok: false, message: 'A chosen customer does not exist' }, { status: 400 })
  const before = settingsOf(me.id)
  const after = { enabled: parsed.data.enabled === 'on', weekday: parsed.data.weekday, hour: parsed.data.hour, customerIds: [...new Set(parsed.data.customerIds)].sort((a, b) => a - b) }
  writeTx(db, () => {
    c.prepare(
      `insert into digest_settings (user_id, enabled, weekday, hour) values (?, ?, ?, ?)
       on conflict(user_id) do update set enabled = excluded.enabled, weekday = excluded.weekday, hour = excluded.hour`,
    ).run(me.id, after.enabled ? 1 : 0, after.weekday, after.hour)
    c.prepare('delete from digest_customers where user_id = ?').run(me.id)
    const add = c.prepare('insert into digest_customers (user_id, customer_id) values (?, ?)')
    for (const id of after.customerIds) add.run(me.id, id)
    writeAudit(db, { actorId: me.id, action: 'update', entity: 'digest_settings', entityId: me.id, before, after })
  })
  return { ok: true, message: after.enabled ? `Your digest comes on ${WEEKDAYS[after.weekday - 1]}s at ${String(after.hour).padStart(2, '0')}:00.` : 'Your weekly digest is switched off.' }
}

export default function Settings({ loaderData, actionData }: Route.ComponentProps) {
  const busy = useNavigation().state !== 'idle'
  const { settings, customers, email, last } = loaderData
  return (
    <div className="mx-auto max-w-3xl">
      <PageHeader title="Settings">Your weekly digest</PageHeader>
      {actionData?.message && <Notice tone={actionData.ok ? 'ok' : 'error'}>{actionData.message}</Notice>}
      <Form method="post" className="my-4 space-y-4 rounded-md border border-line bg-panel p-4">
        <div className="space-y-1 text-sm text-ink-soft">
          <p>
            Sent to <span className="font-medium break-all text-ink">{email}</span>: what is overdue, falling due, in trouble, failed or disagreeing, and the
            week&apos;s visits, each with how it changed since your digest the week before.
          </p>
          <p>
            {last
              ? `Latest: ${last.subject} (${last.status}${last.sentAt ? `, ${last.sentAt.slice(0, 16).replace('T', ' ')} UTC` : ''}).`
              : 'No digest has been sent to you yet.'}
          </p>
        </div>
        <label className="flex min-h-11 items-center gap-2 text-sm font-medium sm:min-h-0">
          <input type="checkbox" name="enabled" defaultChecked={settings.enabled} className="size-4 accent-accent" /> Send me the weekly digest
        </label>
        <div className="grid gap-4 sm:grid-cols-2">
          <Field label="Day">
            <select name="weekday" defaultValue={settings.weekday} className={inputClass}>
              {WEEKDAYS.map((d, i) => (
                <option key={d} value={i + 1}>
                  {d}
                </option>
              ))}
            </select>
          </Field>
          <Field label="Hour (office time)">
            <select name="hour" defaultValue={settings.hour} className={inputClass}>
              {Array.from({ length: 24 }, (_, h) => (
                <option key={h} value={h}>
                  {String(h).padStart(2, '0')}:00
                </option>
              ))}
            </select>
          </Field>
        </div>
        <fieldset>
          <legend className="text-sm font-medium">Customers I follow</legend>
          <p className="text-xs text-ink-soft">None ticked: the digest covers the whole fleet.</p>
          <div className="mt-2 grid max-h-72 gap-1 overflow-auto rounded-sm border border-line p-2 sm:grid-cols-2">
            {customers.map((c) => (
              <label key={c.id} className="flex min-h-11 items-center gap-2 py-1 text-sm sm:min-h-0">
                <input type="checkbox" name="customerIds" value={c.id} defaultChecked={settings.customerIds.includes(c.id)} className="size-4 accent-accent" /> {c.name}
              </label>
            ))}
          </div>
        </fieldset>
        <button className={buttonClass} disabled={busy}>
          Save
        </button>
      </Form>
    </div>
  )
}
