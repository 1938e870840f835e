import { and, eq, isNull, lte, or, sql } from 'drizzle-orm'
import { Resend } from 'resend'
import { z } from 'zod'
import { startResendFake } from '../../../mocks/resend'
import type { Db } from '../db'
import { emailOutbox } from '../schema'

export const MAX_ATTEMPTS = 4
/** A message left 'sending' this long was being sent by a process that died: it may be tried again. */
export const LEASE_MS = 5 * 60_000
const TIMEOUT_MS = 20_000
const BASE_BACKOFF_MS = 60_000

const emailEnv = z.object({
  RESEND_API_KEY: z.string().optional().transform((v) => v || undefined),
  EMAIL_FROM: z.string().min(3).default('Ductkeeper <digest@ductkeeper.test>'),
})

type OutboxKind = 'digest' | 'notice' | 'all-clear'

export interface NewMessage {
  kind: OutboxKind
  idempotencyKey: string
  to: string
  subject: string
  html: string
  text: string
  recipientUserId?: number | null
  visitId?: number | null
}

let client: Resend | undefined

/**
 * The one way out. Without RESEND_API_KEY (npm start, the tests) a fake key is used and the fake
 * provider in mocks/resend.ts answers inside this process, so nothing leaves the machine.
 */
function resend(): Resend {
  if (client) return client
  const e = emailEnv.parse(process.env)
  if (!e.RESEND_API_KEY) startResendFake()
  client = new Resend(e.RESEND_API_KEY ?? 're_local_fake_key')
  return client
}

/**
 * Records the message before anything is sent. A second enqueue with the same key changes nothing and
 * answers the first message's id, so a digest or a notice goes out once however many callers try.
 */
export function enqueue(db: Db, m: NewMessage): { id: number; created: boolean } {
  const inserted = db
    .insert(emailOutbox)
    .values({
      kind: m.kind,
      idempotencyKey: m.idempotencyKey,
      recipientUserId: m.recipientUserId ?? null,
      visitId: m.visitId ?? null,
      toAddress: m.to,
      subject: m.subject,
      html: m.html,
      text: m.text,
    })
    .onConflictDoNothing()
    .returning({ id: emailOutbox.id })
    .all()
  if (inserted[0]) return { id: inserted[0].id, created: true }
  const existing = db.select({ id: emailOutbox.id }).from(emailOutbox).where(eq(emailOutbox.idempotencyKey, m.idempotencyKey)).get()
  if (!existing) throw new Error(`Outbox message ${m.idempotencyKey} was neither inserted nor found`)
  return { id: existing.id, created: false }
}

const iso = (d: Date) => d.toISOString()

// Ready: queued and due, or 'sending' whose lease ran out (its sender crashed mid-send).
const ready = (now: string) =>
  or(
    and(eq(emailOutbox.status, 'queued'), or(isNull(emailOutbox.nextAttemptAt), lte(emailOutbox.nextAttemptAt, now))),
    and(eq(emailOutbox.status, 'sending'), lte(emailOutbox.nextAttemptAt, now)),
  )

/** Takes the message for this process in one UPDATE: of two processes racing, only one changes the row. */
function claim(db: Db, id: number, now: Date, force = false): boolean {
  const result = db
    .update(emailOutbox)
    .set({ status: 'sending', attempts: sql`${emailOutbox.attempts} + 1`, nextAttemptAt: iso(new Date(now.getTime() + LEASE_MS)) })
    .where(and(eq(emailOutbox.id, id), force ? or(eq(emailOutbox.status, 'queued'), ready(iso(now))) : ready(iso(now))))
    .run()
  return result.changes === 1
}

/** Seconds or an HTTP date, as Retry-After may carry either. */
function retryAfterMs(value: string | undefined, now: Date): number | null {
  if (!value) return null
  const seconds = Number(value)
  if (Number.isFinite(seconds) && seconds >= 0) return seconds * 1000
  const at = Date.parse(value)
  return Number.isNaN(at) ? null : Math.max(0, at - now.getTime())
}

export type SendOutcome = 'sent' | 'retry' | 'failed' | 'skipped'

async function deliver(db: Db, id: number, now: Date): Promise<SendOutcome> {
  const m = db.select().from(emailOutbox).where(eq(emailOutbox.id, id)).get()
  if (!m) return 'skipped'
  const from = emailEnv.parse(process.env).EMAIL_FROM
  let result: Awaited<ReturnType<Resend['emails']['send']>>
  try {
    result = await resend().emails.send(
      { from, to: [m.toAddress], subject: m.subject, html: m.html, text: m.text },
      // The provider drops a repeat of this key, so a resend after a crash cannot reach the inbox twice.
      { idempotencyKey: m.idempotencyKey ?? `outbox:${m.id}`, signal: AbortSignal.timeout(TIMEOUT_MS) } as { idempotencyKey: string },
    )
  } catch (error) {
    result = { data: null, error: { name: 'application_error', statusCode: null, message: error instanceof Error ? error.message : String(error) }, headers: null } as typeof result
  }
  if (result.data?.id) {
    db.update(emailOutbox)
      .set({ status: 'sent', providerId: result.data.id, sentAt: iso(new Date()), nextAttemptAt: null, error: null })
      .where(eq(emailOutbox.id, id))
      .run()
    return 'sent'
  }
  const status = result.error?.statusCode ?? null
  const reason = `${status ?? 'no answer'}: ${result.error?.message ?? 'unknown error'}`
  // Rate limits, provider faults and no answer at all (network, timeout) pass; anything else will not.
  const transient = status === null || status === 429 || status >= 500
  if (transient && m.attempts < MAX_ATTEMPTS) {
    const headers = (result.headers ?? {}) as Record<string, string>
    const wait = retryAfterMs(headers['retry-after'], now) ?? BASE_BACKOFF_MS * 2 ** (m.attempts - 1)
    db.update(emailOutbox)
      .set({ status: 'queued', nextAttemptAt: iso(new Date(now.getTime() + wait)), error: reason })
      .where(eq(emailOutbox.id, id))
      .run()
    return 'retry'
  }
  db.update(emailOutbox)
    .set({ status: 'failed', nextAttemptAt: null, error: `${reason} (after ${m.attempts} ${m.attempts === 1 ? 'try' : 'tries'})` })
    .where(eq(emailOutbox.id, id))
    .run()
  return 'failed'
}

/** Sends one message now if no other process holds it; 'send now' may also take one waiting for a retry. */
export async function sendMessage(db: Db, id: number, o: { now?: Date; force?: boolean } = {}): Promise<SendOutcome> {
  const now = o.now ?? new Date()
  if (!claim(db, id, now, o.force)) return 'skipped'
  return deliver(db, id, now)
}

/**
 * Puts a failed message back in the queue for one more try, keeping its error until that try answers.
 * Only a failed message: one queued, sending or sent is left alone (false).
 */
export function requeueFailed(db: Db, id: number): boolean {
  const result = db
    .update(emailOutbox)
    .set({ status: 'queued', nextAttemptAt: null })
    .where(and(eq(emailOutbox.id, id), eq(emailOutbox.status, 'failed')))
    .run()
  return result.changes === 1
}

/** Sends every message that is due, one after another. */
export async function sendDue(db: Db, now = new Date()): Promise<Record<SendOutcome, number>> {
  const counts: Record<SendOutcome, number> = { sent: 0, retry: 0, failed: 0, skipped: 0 }
  const due = db.select({ id: emailOutbox.id }).from(emailOutbox).where(ready(iso(now))).orderBy(emailOutbox.id).all()
  for (const { id } of due) counts[await sendMessage(db, id, { now })]++
  return counts
}
