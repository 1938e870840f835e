import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { startServer } from '#tests/setup/server'
import { sessionCookieFor, userIdByEmail } from '#tests/setup/sessions'
import { seededDb } from '#tests/setup/temp-db'

describe('the admin outbox page', () => {
  let server: Awaited<ReturnType<typeof startServer>>
  let data: ReturnType<typeof seededDb>
  const cookie: Record<string, string> = {}

  beforeAll(async () => {
    data = seededDb('small')
    // The schedule must not send on its own while the page is tested.
    server = await startServer(data.path, { DUCTKEEPER_JOBS: 'off' })
    for (const who of ['admin', 'manager']) cookie[who] = (await sessionCookieFor(data.db, userIdByEmail(data.db, `${who}@ductkeeper.test`))).cookie
  })
  afterAll(async () => {
    await server?.stop()
    data?.cleanup()
  })

  const page = (who: string, query = '') => fetch(`${server.url}/admin/outbox${query}`, { headers: { Cookie: cookie[who] } })

  it('is for admins only', async () => {
    expect((await page('manager')).status).toBe(403)
    expect((await page('admin')).status).toBe(200)
  })

  it('previews a digest without sending, sends it now, and shows it as sent in a sandboxed frame', async () => {
    const manager = userIdByEmail(data.db, 'manager@ductkeeper.test')
    const overdue = data.db.$client
      .prepare(`select count(*) from detectors where state <> 'out-of-service' and (next_visual_on < ?1 or next_functional_on < ?1 or next_sensitivity_on < ?1 or next_cleaning_on < ?1)`)
      .pluck()
      .get({ 1: '2026-06-15' }) as number
    const preview = await (await page('admin', `?preview=${manager}`)).text()
    expect(preview).toContain('Preview (not sent)')
    expect(preview).toContain(`${overdue} overdue`)
    expect(data.db.$client.prepare('select count(*) from email_outbox').pluck().get()).toBe(0)

    const body = new URLSearchParams({ intent: 'send-digest', userId: String(manager) })
    const res = await fetch(`${server.url}/admin/outbox`, { method: 'POST', body, headers: { Cookie: cookie.admin, Origin: server.url, 'Content-Type': 'application/x-www-form-urlencoded' } })
    expect(res.status).toBeLessThan(400)
    const row = data.db.$client.prepare(`select id, status, attempts, provider_id from email_outbox where recipient_user_id = ? and kind = 'digest'`).get(manager) as { id: number; status: string; attempts: number; provider_id: string }
    expect(row).toMatchObject({ status: 'sent', attempts: 1 })
    expect(row.provider_id).toMatch(/^fake-/)

    const shown = await (await page('admin', `?message=${row.id}`)).text()
    expect(shown).toMatch(/<iframe[^>]*sandbox=""/)
    expect(shown).toContain('Detectors overdue')
  })

  it('sends a failed message again from the list, once, and only a failed one', async () => {
    const q = data.db.$client
    const id = Number(
      q
        .prepare(
          `insert into email_outbox (kind, idempotency_key, to_address, subject, html, text, status, attempts, error)
           values ('notice', 'outbox-retry-test', 'dispatch@northwatch.test', 'Place in test: retry', '<p>Retry</p>', 'Retry', 'failed', 4, '503: provider down (after 4 tries)')`,
        )
        .run().lastInsertRowid,
    )
    const listed = await (await page('admin')).text()
    expect(listed).toContain('503: provider down (after 4 tries)')
    expect(listed).toContain(`Send message ${id} again`)
    const retry = () =>
      fetch(`${server.url}/admin/outbox`, {
        method: 'POST',
        body: new URLSearchParams({ intent: 'retry', id: String(id) }),
        headers: { Cookie: cookie.admin, Origin: server.url, 'Content-Type': 'application/x-www-form-urlencoded' },
      })
    expect((await retry()).status).toBeLessThan(400)
    expect(q.prepare('select status, attempts, provider_id as p from email_outbox where id = ?').get(id)).toMatchObject({ status: 'sent', attempts: 5, p: expect.stringMatching(/^fake-/) })
    expect(q.prepare(`select count(*) from audit_log where action = 'outbox.retry' and entity_id = ?`).pluck().get(String(id))).toBe(1)
    expect((await retry()).status).toBe(409)
  })

  it('refuses a bad send with a 400 and a message', async () => {
    const body = new URLSearchParams({ intent: 'send-digest', userId: 'nobody' })
    const res = await fetch(`${server.url}/admin/outbox`, { method: 'POST', body, headers: { Cookie: cookie.admin, Origin: server.url, 'Content-Type': 'application/x-www-form-urlencoded' } })
    expect(res.status).toBe(400)
  })

  it('a manager switches the digest off and follows one customer on the settings page; bad input is a 400', async () => {
    const manager = userIdByEmail(data.db, 'manager@ductkeeper.test')
    const post = (body: URLSearchParams) =>
      fetch(`${server.url}/settings`, { method: 'POST', body, headers: { Cookie: cookie.manager, Origin: server.url, 'Content-Type': 'application/x-www-form-urlencoded' } })
    const customer = data.db.$client.prepare('select id from customers order by id limit 1').pluck().get() as number
    expect((await post(new URLSearchParams({ weekday: '3', hour: '9', customerIds: String(customer) }))).status).toBeLessThan(400)
    expect(data.db.$client.prepare('select enabled, weekday, hour from digest_settings where user_id = ?').get(manager)).toEqual({ enabled: 0, weekday: 3, hour: 9 })
    expect(data.db.$client.prepare('select customer_id from digest_customers where user_id = ?').pluck().all(manager)).toEqual([customer])
    expect(data.db.$client.prepare(`select count(*) from audit_log where entity = 'digest_settings' and entity_id = ?`).pluck().get(String(manager))).toBe(1)
    expect((await post(new URLSearchParams({ enabled: 'on', weekday: '8', hour: '9' }))).status).toBe(400)
    expect((await post(new URLSearchParams({ enabled: 'on', weekday: '1', hour: '7', customerIds: '999999' }))).status).toBe(400)
  })
})
