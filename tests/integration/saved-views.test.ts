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
    const again = await save(lead, { intent: 'save', page: 'devices', name: 'Overdue kitchens', query: 'due=overdue', overwrite: true })
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

  it('answers 409 on a name in use unless told to replace it; renames; deletes', async () => {
    const a = await save(office, { intent: 'save', page: 'devices', name: 'Kitchens', query: 'environment=kitchen' })
    const b = await save(office, { intent: 'save', page: 'devices', name: 'Humid', query: 'environment=humid' })
    expect([a.status, b.status]).toEqual([200, 200])

    // Saving over a name asks first: nothing changes until the caller says so.
    const clash = await save(office, { intent: 'save', page: 'devices', name: 'Kitchens', query: 'state=trouble' })
    expect(clash).toEqual({ status: 409, body: { error: 'You already have a view named “Kitchens”.', conflict: { id: a.body.id, name: 'Kitchens' } } })
    expect((await list(office)).find((v: { id: number }) => v.id === a.body.id).query).toBe('environment=kitchen')
    const replaced = await save(office, { intent: 'save', page: 'devices', name: 'Kitchens', query: 'state=trouble', overwrite: true })
    expect(replaced).toEqual({ status: 200, body: { ok: true, id: a.body.id } })
    expect((await list(office)).find((v: { id: number }) => v.id === a.body.id).query).toBe('state=trouble')

    // Renaming onto another view's name asks the same way; with overwrite the other view goes.
    expect((await save(office, { intent: 'rename', id: b.body.id, name: 'Damp rooms' })).status).toBe(200)
    expect((await save(office, { intent: 'rename', id: b.body.id, name: 'Kitchens' })).status).toBe(409)
    expect((await list(office)).map((v: { name: string }) => v.name)).toEqual(['Damp rooms', 'Kitchens'])
    expect((await save(office, { intent: 'rename', id: b.body.id, name: 'Kitchens', overwrite: true })).status).toBe(200)
    expect(await list(office)).toEqual([{ id: b.body.id, name: 'Kitchens', query: 'environment=humid' }])
    const renames = data.db.$client.prepare("select before, after from audit_log where action = 'view.rename' and entity_id = ? order by id").all(String(b.body.id))
    expect(renames).toEqual([
      { before: JSON.stringify({ name: 'Humid' }), after: JSON.stringify({ name: 'Damp rooms' }) },
      { before: JSON.stringify({ name: 'Damp rooms' }), after: JSON.stringify({ name: 'Kitchens' }) },
    ])

    // Only one's own views can be renamed; a blank name is refused.
    expect((await save(lead, { intent: 'rename', id: b.body.id, name: 'Mine now' })).status).toBe(404)
    expect((await save(office, { intent: 'rename', id: b.body.id, name: '   ' })).status).toBe(400)
    expect((await save(office, { intent: 'delete', id: b.body.id })).status).toBe(200)
    expect(await list(office)).toEqual([])
  })
})
