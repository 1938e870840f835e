import { eq } from 'drizzle-orm'
import { http, HttpResponse } from 'msw'
import { afterAll, beforeEach, describe, expect, it } from 'vitest'
import { createDb } from '~/.server/db'
import { enqueue, LEASE_MS, MAX_ATTEMPTS, sendDue, sendMessage } from '~/.server/email/send'
import { emailOutbox } from '~/.server/schema'
import { resendApiBase, startResendFake } from '../../mocks/resend'
import { allowConsoleError } from '../setup/console-guard'
import { tempDbPath } from '../setup/temp-db'

const tmp = tempDbPath()
const db = createDb(tmp.path)
const fake = startResendFake()

afterAll(() => {
  db.$client.close()
  tmp.cleanup()
})
beforeEach(() => fake.server.resetHandlers())

let n = 0
const message = () => ({ kind: 'notice' as const, idempotencyKey: `test:${++n}`, to: 'office@ductkeeper.test', subject: `Test ${n}`, html: '<p>Hello</p>', text: 'Hello' })
const row = (id: number) => db.select().from(emailOutbox).where(eq(emailOutbox.id, id)).get()!

describe('outbox sending', () => {
  it('records the message as queued before sending, then sent with the provider id', async () => {
    const { id } = enqueue(db, message())
    expect(row(id).status).toBe('queued')
    const before = fake.messages.length
    expect(await sendMessage(db, id)).toBe('sent')
    const sent = row(id)
    expect(sent.status).toBe('sent')
    expect(sent.attempts).toBe(1)
    expect(fake.messages.length).toBe(before + 1)
    const captured = fake.messages.at(-1)!
    expect(sent.providerId).toBe(captured.id)
    expect(captured.idempotencyKey).toBe(`test:${n}`)
    expect(captured.to).toEqual(['office@ductkeeper.test'])
  })

  it('a second enqueue with the same key adds nothing', () => {
    const m = message()
    const a = enqueue(db, m)
    const b = enqueue(db, { ...m, subject: 'other' })
    expect(b).toEqual({ id: a.id, created: false })
    expect(db.select().from(emailOutbox).where(eq(emailOutbox.idempotencyKey, m.idempotencyKey)).all()).toHaveLength(1)
  })

  it('a claimed message is not sent by a second sender', async () => {
    const { id } = enqueue(db, message())
    const before = fake.messages.length
    const [a, b] = await Promise.all([sendMessage(db, id), sendMessage(db, id)])
    expect([a, b].sort()).toEqual(['sent', 'skipped'])
    expect(fake.messages.length).toBe(before + 1)
  })

  it('waits as long as Retry-After says after a 429, then sends', async () => {
    const { id } = enqueue(db, message())
    fake.server.use(
      http.post(`${resendApiBase()}/emails`, () => HttpResponse.json({ statusCode: 429, name: 'rate_limit_exceeded', message: 'Too many requests' }, { status: 429, headers: { 'retry-after': '90' } }), { once: true }),
    )
    const now = new Date('2026-06-15T12:00:00.000Z')
    expect(await sendMessage(db, id, { now })).toBe('retry')
    const waiting = row(id)
    expect(waiting.status).toBe('queued')
    expect(waiting.nextAttemptAt).toBe('2026-06-15T12:01:30.000Z')
    expect(waiting.error).toContain('429')
    // Not before its time…
    expect(await sendMessage(db, id, { now: new Date('2026-06-15T12:01:29.000Z') })).toBe('skipped')
    // …and then it goes.
    expect(await sendMessage(db, id, { now: new Date('2026-06-15T12:01:30.000Z') })).toBe('sent')
    expect(row(id).attempts).toBe(2)
  })

  it(`gives up after ${MAX_ATTEMPTS} tries of a 500, with the reason`, async () => {
    const { id } = enqueue(db, message())
    let calls = 0
    fake.server.use(
      http.post(`${resendApiBase()}/emails`, () => {
        calls++
        return HttpResponse.json({ statusCode: 500, name: 'internal_server_error', message: 'Provider fault' }, { status: 500 })
      }),
    )
    let now = new Date('2026-06-16T08:00:00.000Z')
    const outcomes: string[] = []
    for (let i = 0; i < MAX_ATTEMPTS; i++) {
      outcomes.push(await sendMessage(db, id, { now }))
      const next = row(id).nextAttemptAt
      if (next) now = new Date(next)
    }
    expect(outcomes).toEqual(['retry', 'retry', 'retry', 'failed'])
    expect(calls).toBe(MAX_ATTEMPTS)
    const failed = row(id)
    expect(failed.status).toBe('failed')
    expect(failed.attempts).toBe(MAX_ATTEMPTS)
    expect(failed.error).toMatch(/500: Provider fault \(after 4 tries\)/)
    // Backoff grows between tries.
    expect(await sendMessage(db, id, { now: new Date('2030-01-01T00:00:00.000Z') })).toBe('skipped')
  })

  it('a message left sending by a crashed sender is taken again after its lease', async () => {
    const { id } = enqueue(db, message())
    const crashedAt = new Date('2026-06-17T09:00:00.000Z')
    db.update(emailOutbox).set({ status: 'sending', attempts: 1, nextAttemptAt: new Date(crashedAt.getTime() + LEASE_MS).toISOString() }).where(eq(emailOutbox.id, id)).run()
    await sendDue(db, new Date(crashedAt.getTime() + LEASE_MS - 1000))
    expect(row(id).status).toBe('sending')
    const before = fake.messages.length
    const again = await sendDue(db, new Date(crashedAt.getTime() + LEASE_MS))
    expect(again.sent).toBeGreaterThanOrEqual(1)
    expect(row(id).status).toBe('sent')
    expect(fake.messages.length).toBeGreaterThan(before)
  })

  it('no request leaves the machine: an unanswered outside request errors', async () => {
    allowConsoleError()
    await expect(fetch('https://example.com/')).rejects.toThrow()
  })
})
