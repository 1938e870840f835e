import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { startServer } from '#tests/setup/server'
import { sessionCookieFor, userIdByEmail } from '#tests/setup/sessions'
import { seededDb } from '#tests/setup/temp-db'

describe('saved views', () => {
  let server: Awaited<ReturnType<typeof startServer>>
  let data: ReturnType<typeof seededDb>
  let lead = ''
  let office = ''
  beforeAll(async () => {
    data = seededDb('small')
    server = await startServer(data.path)
    lead = (await sessionCookieFor(data.db, userIdByEmail(data.db, 'lead@ductkeeper.test'))).cookie
    office = (await sessionCookieFor(data.db, userIdByEmail(data.db, 'office@ductkeeper.test'))).cookie
  })
  afterAll(async () => {
    await server?.stop()
    data?.cleanup()
  })

  const save = async (cookie: string, body: Record<string, unknown>) => {
    const res = await fetch(`${server.url}/api/views`, { method: 'POST', headers: { Cookie: cookie, Origin: server.url, 'Content-Type': 'application/json' }, body: JSON.stringify(body) })
    return { status: res.status, body: await res.json() }
  }
  const list = async (cookie: string) => (await (await fetch(`${server.url}/api/views?page=devices`, { headers: { Cookie: cookie } })).json()).views

  it('saves per person, updates in place under the same name, audits both, deletes only one’s own', async () => {
    const first = await save(lead, { intent: 'save', page: 'devices', name: 'Overdue kitchens', query: 'due=overdue&environment=kitchen' })
    await save(lead, { intent: 'save', page: 'devices', name: 'Humid', query: 'environment=humid' })
    const again = await save(lead, { intent: 'save', page: 'devices', name: 'Overdue kitchens', query: 'due=overdue' })
    expect(again.body.id).toBe(first.body.id)
    expect(await list(lead)).toEqual([
      { id: expect.any(Number), name: 'Humid', query: 'environment=humid' },
      { id: first.body.id, name: 'Overdue kitchens', query: 'due=overdue' },
    ])
    expect(await list(office)).toEqual([])
    const audit = data.db.$client.prepare("select entity_id as id, before from audit_log where action = 'view.save' order by audit_log.id").all() as Array<{ id: string; before: string | null }>
    expect(audit.at(-1)).toEqual({ id: String(first.body.id), before: JSON.stringify({ query: 'due=overdue&environment=kitchen' }) })
    expect((await save(office, { intent: 'delete', id: first.body.id })).status).toBe(404)
    expect((await save(lead, { intent: 'delete', id: first.body.id })).status).toBe(200)
    expect((await save(lead, { intent: 'save', page: 'devices', name: '', query: '' })).status).toBe(400)
  })
})
