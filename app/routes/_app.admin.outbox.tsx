import { desc, eq } from 'drizzle-orm'
import { data, Form, Link, useNavigation } from 'react-router'
import { z } from 'zod'
import { requireUser } from '~/.server/auth'
import { writeAudit } from '~/.server/audit'
import { getDb, writeTx } from '~/.server/db'
import { digestRecipients } from '~/.server/email/digest'
import { digestMessage, queueDigest } from '~/.server/email/digest-message'
import { requeueFailed, sendMessage } from '~/.server/email/send'
import { readFormData } from '~/.server/http'
import { emailOutbox } from '~/.server/schema'
import { officeToday } from '~/.server/today'
import { buttonClass, Notice, PageHeader, quietButtonClass } from '~/components/ui/page-header'
import type { RouteAccess } from '~/domain/permissions'
import type { OutboxStatus } from '~/domain/vocabulary'
import type { Route } from './+types/_app.admin.outbox'

export const handle = { access: { loader: 'manage:settings', action: 'manage:settings' } satisfies RouteAccess }

export const meta: Route.MetaFunction = () => [{ title: 'Outbox · Ductkeeper' }]

const pageQuery = z.object({
  message: z.coerce.number().int().positive().optional().catch(undefined),
  preview: z.coerce.number().int().positive().optional().catch(undefined),
})

export async function loader({ request }: Route.LoaderArgs) {
  await requireUser(request, 'manage:settings')
  const q = pageQuery.parse(Object.fromEntries(new URL(request.url).searchParams))
  const db = getDb()
  const messages = db
    .select({
      id: emailOutbox.id,
      kind: emailOutbox.kind,
      visitId: emailOutbox.visitId,
      to: emailOutbox.toAddress,
      subject: emailOutbox.subject,
      status: emailOutbox.status,
      attempts: emailOutbox.attempts,
      error: emailOutbox.error,
      nextAttemptAt: emailOutbox.nextAttemptAt,
      createdAt: emailOutbox.createdAt,
      sentAt: emailOutbox.sentAt,
    })
    .from(emailOutbox)
    .orderBy(desc(emailOutbox.id))
    .limit(200)
    .all()
  const open = q.message ? (db.select({ id: emailOutbox.id, subject: emailOutbox.subject, html: emailOutbox.html, text: emailOutbox.text }).from(emailOutbox).where(eq(emailOutbox.id, q.message)).get() ?? null) : null
  const recipients = digestRecipients(db).map((r) => ({ userId: r.userId, name: r.name, email: r.email, enabled: r.enabled }))
  const who = q.preview ? recipients.find((r) => r.userId === q.preview) : undefined
  const preview = who ? await digestMessage(db, { ...who, customerIds: digestRecipients(db).find((r) => r.userId === who.userId)?.customerIds ?? [] }, officeToday()) : null
  return { messages, open, recipients, preview: preview ? { userId: who!.userId, subject: preview.subject, html: preview.html, text: preview.text } : null }
}

const outboxAction = z.discriminatedUnion('intent', [
  z.object({ intent: z.literal('send-digest'), userId: z.coerce.number().int().positive() }),
  z.object({ intent: z.literal('retry'), id: z.coerce.number().int().positive() }),
])

const said = (outcome: Awaited<ReturnType<typeof sendMessage>>) =>
  outcome === 'sent' ? 'sent' : outcome === 'retry' ? 'queued for a retry' : outcome === 'failed' ? 'not sent (failed)' : 'already on its way'

export async function action({ request }: Route.ActionArgs) {
  const user = await requireUser(request, 'manage:settings')
  const parsed = outboxAction.safeParse(Object.fromEntries(await readFormData(request)))
  if (!parsed.success) return data({ ok: false, message: parsed.error.issues[0]?.message ?? 'Check the fields' }, { status: 400 })
  const db = getDb()
  const input = parsed.data
  if (input.intent === 'retry') {
    const id = input.id
    const requeued = writeTx(db, () => {
      if (!requeueFailed(db, id)) return false
      writeAudit(db, { actorId: user.id, action: 'outbox.retry', entity: 'email_outbox', entityId: id, before: { status: 'failed' }, after: { status: 'queued' } })
      return true
    })
    if (!requeued) return data({ ok: false, message: `Message ${id} is not a failed message; only a failed one is sent again.` }, { status: 409 })
    const outcome = await sendMessage(db, id, { force: true })
    return { ok: outcome !== 'failed', message: `Message ${id} ${said(outcome)}.`, id }
  }
  const r = digestRecipients(db).find((x) => x.userId === input.userId)
  if (!r) return data({ ok: false, message: 'That person does not receive the digest' }, { status: 400 })
  const today = officeToday()
  // This week's key: sending now counts as this week's digest, so the schedule will not send another.
  const { id, created } = await queueDigest(db, r, today)
  const outcome = await sendMessage(db, id, { force: true })
  return { ok: outcome !== 'failed', message: `${r.name}'s digest for this week ${created ? '' : '(already in the outbox) '}${said(outcome)}.`, id }
}

// A link that looks like the button beside it, as tall on a touch screen as every button there.
const previewClass = 'inline-flex min-h-8 items-center rounded-sm border border-line-strong px-3 text-sm text-ink hover:bg-sunken touch:min-h-11'
/** Instants as stored (UTC), read at a glance: "2026-06-15 14:05 UTC". */
const utc = (iso: string) => `${iso.slice(0, 16).replace('T', ' ')} UTC`

const KIND_WORDS: Record<string, string> = { digest: 'Weekly digest', notice: 'Notice of work', 'all-clear': 'All-clear' }

const TONE: Record<OutboxStatus, string> = {
  queued: 'bg-soon-soft text-soon',
  sending: 'bg-accent-soft text-accent',
  sent: 'bg-ok-soft text-ok',
  failed: 'bg-late-soft text-late',
}

export default function Outbox({ loaderData, actionData }: Route.ComponentProps) {
  const busy = useNavigation().state !== 'idle'
  const { messages, open, recipients, preview } = loaderData
  const shown = preview ?? open
  return (
    <div className="mx-auto max-w-6xl">
      <PageHeader title="Outbox">Every e-mail Ductkeeper has queued or sent, as its recipient sees it</PageHeader>
      {actionData?.message && <Notice tone={actionData.ok ? 'ok' : 'error'}>{actionData.message}</Notice>}

      <section aria-labelledby="digest-h" className="my-4 rounded-md border border-line bg-panel p-4">
        <h2 id="digest-h" className="font-semibold">
          Weekly digest
        </h2>
        <ul className="mt-2 divide-y divide-line">
          {recipients.map((r) => (
            <li key={r.userId} className="flex flex-wrap items-center justify-between gap-2 py-2 text-sm">
              <span>
                {r.name} <span className="text-ink-faint">{r.email}</span>
                {!r.enabled && <span className="ml-2 rounded-sm bg-idle-soft px-1.5 text-xs text-idle">switched off</span>}
              </span>
              <span className="flex gap-2">
                <Link className={previewClass} to={`?preview=${r.userId}`}>
                  Preview
                </Link>
                <Form method="post">
                  <input type="hidden" name="intent" value="send-digest" />
                  <input type="hidden" name="userId" value={r.userId} />
                  <button className={`${buttonClass} min-h-11 sm:min-h-8`} disabled={busy}>
                    Send now
                  </button>
                </Form>
              </span>
            </li>
          ))}
        </ul>
      </section>

      {shown && (
        <section aria-labelledby="shown-h" className="my-4 rounded-md border border-line bg-panel p-4">
          <h2 id="shown-h" className="font-semibold">
            {preview ? 'Preview (not sent): ' : ''}
            {shown.subject}
          </h2>
          <div className="mt-3 grid gap-4 lg:grid-cols-2">
            {/* No scripts, no same origin: the message is shown, never run. */}
            <iframe title="The message as HTML" sandbox="" srcDoc={shown.html} className="h-[36rem] w-full rounded-sm border border-line bg-white" />
            <pre className="h-[36rem] overflow-auto rounded-sm border border-line bg-sunken p-3 font-mono text-xs whitespace-pre-wrap">{shown.text}</pre>
          </div>
        </section>
      )}

      <section aria-labelledby="messages-h" className="my-4 rounded-md border border-line bg-panel">
        <h2 id="messages-h" className="p-4 font-semibold">
          Messages <span className="text-ink-faint">({messages.length})</span>
        </h2>
        {messages.length === 0 ? (
          <p className="px-4 pb-4 text-sm text-ink-soft">Nothing has been queued yet.</p>
        ) : (
          <ul className="divide-y divide-line border-t border-line">
            {messages.map((m) => (
              <li key={m.id} className="grid gap-1 px-4 py-2 text-sm sm:grid-cols-[7rem_1fr_auto] sm:items-center">
                <span className={`w-fit rounded-sm px-1.5 text-xs font-medium ${TONE[m.status]}`}>{m.status}</span>
                <span className="min-w-0">
                  <Link to={`?message=${m.id}`} className="font-medium text-accent underline-offset-2 hover:underline">
                    {m.subject}
                  </Link>
                  <span className="block text-xs break-words text-ink-faint">
                    {KIND_WORDS[m.kind] ?? m.kind} to {m.to}
                    {m.visitId ? (
                      <>
                        {' '}
                        for{' '}
                        <Link to={`/visits/${m.visitId}`} className="underline underline-offset-2">
                          visit {m.visitId}
                        </Link>
                      </>
                    ) : null}{' '}
                    · queued {utc(m.createdAt)}
                    {m.sentAt ? ` · sent ${utc(m.sentAt)}` : ''}
                    {m.status === 'queued' && m.nextAttemptAt ? ` · next try ${utc(m.nextAttemptAt)}` : ''}
                  </span>
                  {m.error && <span className="block text-xs text-late">{m.error}</span>}
                </span>
                <span className="flex items-center gap-2 text-xs text-ink-soft">
                  {m.attempts} {m.attempts === 1 ? 'try' : 'tries'}
                  {m.status === 'failed' && (
                    <Form method="post">
                      <input type="hidden" name="intent" value="retry" />
                      <input type="hidden" name="id" value={m.id} />
                      <button className={quietButtonClass} disabled={busy} aria-label={`Send message ${m.id} again`}>
                        Send again
                      </button>
                    </Form>
                  )}
                </span>
              </li>
            ))}
          </ul>
        )}
      </section>
    </div>
  )
}
