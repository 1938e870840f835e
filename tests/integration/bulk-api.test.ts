import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { createToken } from '~/.server/repos/tokens'
import { makeVisits } from '#tests/setup/bulk'
import { startServer } from '#tests/setup/server'
import { sessionCookieFor, userIdByEmail } from '#tests/setup/sessions'
import { seededDb } from '#tests/setup/temp-db'

describe('POST /api/bulk/:action and /api/bulk/undo', () => {
  let server: Awaited<ReturnType<typeof startServer>>
  let data: ReturnType<typeof seededDb>
  const cookie: Record<string, string> = {}
  let ids: number[]
  const q = () => data.db.$client

  beforeAll(async () => {
    data = seededDb('small')
    q().exec('delete from closed_days; delete from observed_holidays; update users set daily_capacity = null')
    server = await startServer(data.path)
    for (const who of ['admin', 'lead', 'office', 'tech', 'manager']) cookie[who] = (await sessionCookieFor(data.db, userIdByEmail(data.db, `${who}@ductkeeper.test`))).cookie
    const siteId = (q().prepare("select id from sites where region = 'US-TX' limit 1").get() as { id: number }).id
    ids = makeVisits(data.db, { n: 4, siteId, date: '2026-06-16', technicianId: null })
  })
  afterAll(async () => {
    await server?.stop()
    data?.cleanup()
  })

  const post = (path: string, body: unknown, who = 'office') =>
    fetch(`${server.url}${path}`, { method: 'POST', headers: { Cookie: cookie[who], Origin: server.url, 'Content-Type': 'application/json' }, body: JSON.stringify(body) })
  const dates = () => (q().prepare(`select scheduled_on d from visits where id in (${ids.join(',')}) order by id`).all() as Array<{ d: string }>).map((r) => r.d)

  it('refuses roles without the capability, unknown actions and bad bodies, never with a 500', async () => {
    for (const who of ['tech', 'manager']) expect((await post('/api/bulk/reschedule', { preview: true, ids, mode: 'shift', days: 2 }, who)).status).toBe(403)
    // Acknowledging is the triage lead's: the office may reschedule but not acknowledge.
    expect((await post('/api/bulk/acknowledge', { preview: true, ids: [1] }, 'office')).status).toBe(403)
    expect((await post('/api/bulk/teleport', { preview: true, ids })).status).toBe(404)
    const bad = await post('/api/bulk/reschedule', { preview: true, ids, mode: 'shift', days: 'two' })
    expect(bad.status).toBe(400)
    expect(((await bad.json()) as { issues: unknown[] }).issues.length).toBeGreaterThan(0)
    expect((await post('/api/bulk/reschedule', { preview: true, mode: 'shift', days: 2 })).status).toBe(400)
    expect((await post('/api/bulk/reschedule', { preview: true, filter: 'status=lost', mode: 'shift', days: 2 })).status).toBe(400)
    expect((await post('/api/bulk/reschedule', { preview: false, ids, mode: 'shift', days: 2 })).status).toBe(400)
    const form = await fetch(`${server.url}/api/bulk/reschedule`, { method: 'POST', headers: { Cookie: cookie.office, Origin: server.url, 'Content-Type': 'application/x-www-form-urlencoded' }, body: 'preview=true' })
    expect(form.status).toBe(415)
    expect(dates()).toEqual(ids.map(() => '2026-06-16'))
  })

  it('previews, applies with the preview id, reports a stale record, and undoes for the author only', async () => {
    const preview = (await (await post('/api/bulk/reschedule', { preview: true, ids, mode: 'shift', days: 2 })).json()) as { previewId: string; changeCount: number; versions: Record<string, number> }
    expect(preview.changeCount).toBe(4)
    expect(preview.versions).toEqual(Object.fromEntries(ids.map((id) => [String(id), 1])))
    q().prepare('update visits set version = version + 1 where id = ?').run(ids[3])
    // Different settings than previewed: preview again.
    expect((await post('/api/bulk/reschedule', { preview: false, previewId: preview.previewId, mode: 'shift', days: 3 })).status).toBe(409)
    const applied = (await (await post('/api/bulk/reschedule', { preview: false, previewId: preview.previewId, mode: 'shift', days: 2 })).json()) as { changeId: number; applied: number; refused: Array<{ id: number; reason: string }> }
    expect(applied.applied).toBe(3)
    expect(applied.refused).toEqual([{ id: ids[3], label: expect.any(String), reason: expect.stringMatching(/Changed since the preview/) }])
    expect(dates()).toEqual(['2026-06-18', '2026-06-18', '2026-06-18', '2026-06-16'])

    expect((await post('/api/bulk/undo', { changeId: applied.changeId }, 'tech')).status).toBe(403)
    expect((await post('/api/bulk/undo', { changeId: 'x' })).status).toBe(400)
    expect((await post('/api/bulk/undo', { changeId: 999999 })).status).toBe(404)
    const undo = await post('/api/bulk/undo', { changeId: applied.changeId }, 'lead')
    expect(undo.status).toBe(200)
    expect(await undo.json()).toMatchObject({ changeId: applied.changeId, restored: 3 })
    expect(dates()).toEqual(ids.map(() => '2026-06-16'))
    const undone = q().prepare('select undone_by as by from bulk_changes where id = ?').get(applied.changeId) as { by: number }
    expect(undone.by).toBe(userIdByEmail(data.db, 'lead@ductkeeper.test'))
    expect((await post('/api/bulk/undo', { changeId: applied.changeId })).status).toBe(409)
  })

  it('takes versions back from a script instead of a preview id, with a token', async () => {
    const { token } = createToken(data.db, { userId: userIdByEmail(data.db, 'office@ductkeeper.test'), name: 'Bulk script', expiresAt: new Date(Date.now() + 86_400_000), actorId: userIdByEmail(data.db, 'admin@ductkeeper.test') })
    const call = (body: unknown) => fetch(`${server.url}/api/bulk/note`, { method: 'POST', headers: { Authorization: `Bearer ${token}`, 'Content-Type': 'application/json' }, body: JSON.stringify(body) })
    const preview = (await (await call({ preview: true, ids: ids.slice(0, 2), text: 'Gate code changed' })).json()) as { versions: Record<string, number> }
    const applied = await call({ preview: false, ids: ids.slice(0, 2), versions: preview.versions, text: 'Gate code changed' })
    expect(applied.status, await applied.clone().text()).toBe(200)
    expect(((await applied.json()) as { applied: number }).applied).toBe(2)
    expect((q().prepare('select notes from visits where id = ?').get(ids[0]) as { notes: string }).notes).toBe('Gate code changed')
  })

  it('runs the change on its background worker, and the lists\' kept totals follow what it wrote', async () => {
    // A list's total is kept between requests; the worker writes on its own connection.
    const total = async () => ((await (await fetch(`${server.url}/api/visits?from=2026-06-16&to=2026-06-16&limit=1`, { headers: { Cookie: cookie.office } })).json()) as { total: number }).total
    const before = await total()
    expect(before).toBeGreaterThanOrEqual(ids.length)
    const preview = (await (await post('/api/bulk/reschedule', { preview: true, ids, mode: 'shift', days: 2 })).json()) as { previewId: string }
    const applied = (await (await post('/api/bulk/reschedule', { preview: false, previewId: preview.previewId, mode: 'shift', days: 2 })).json()) as { changeId: number; applied: number }
    expect(applied.applied).toBe(ids.length)
    expect(await total()).toBe(before - ids.length)
    expect((await post('/api/bulk/undo', { changeId: applied.changeId })).status).toBe(200)
    expect(await total()).toBe(before)
    expect(server.output()).toContain('Background worker ready for bulk changes')
  })
})
