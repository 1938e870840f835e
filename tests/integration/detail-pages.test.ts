import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { startServer } from '#tests/setup/server'
import { sessionCookieFor, userIdByEmail } from '#tests/setup/sessions'
import { seededDb } from '#tests/setup/temp-db'

// React escapes text in server-rendered HTML; compare against the same escaping.
const html = (s: string) => s.replaceAll('&', '&amp;').replaceAll('<', '&lt;').replaceAll('>', '&gt;').replaceAll("'", '&#x27;').replaceAll('"', '&quot;')

describe('customer, site and unit pages', () => {
  let server: Awaited<ReturnType<typeof startServer>>
  let data: ReturnType<typeof seededDb>
  let cookie = ''
  beforeAll(async () => {
    data = seededDb('small')
    server = await startServer(data.path)
    cookie = (await sessionCookieFor(data.db, userIdByEmail(data.db, 'office@ductkeeper.test'))).cookie
  })
  afterAll(async () => {
    await server?.stop()
    data?.cleanup()
  })

  const get = async (path: string) => {
    const res = await fetch(`${server.url}${path}`, { headers: { Cookie: cookie, Accept: 'text/html' } })
    return { status: res.status, body: await res.text() }
  }
  const one = <T,>(sql: string, ...args: unknown[]) => data.db.$client.prepare(sql).get(...args) as T
  const all = <T,>(sql: string, ...args: unknown[]) => data.db.$client.prepare(sql).all(...args) as T[]

  it('shows a customer with its totals and its sites', async () => {
    const c = one<{ id: number; name: string }>(
      'select c.id, c.name from customers c where exists (select 1 from sites s where s.customer_id = c.id) order by c.id limit 1',
    )
    const sites = all<{ id: number; name: string }>('select id, name from sites where customer_id = ? order by id limit 200', c.id)
    const { status, body } = await get(`/customers/${c.id}`)
    expect(status).toBe(200)
    expect(body).toContain(html(c.name))
    for (const s of sites) {
      expect(body).toContain(html(s.name))
      expect(body).toContain(`href="/sites/${s.id}"`)
    }
    expect(body).toContain('Before any work: notify, then work.')
  })

  it('shows a site with the monitoring company to call and its detectors', async () => {
    const s = one<{ id: number; phone: string; notifyLeadMinutes: number }>(
      `select s.id, mc.phone, mc.notify_lead_minutes as notifyLeadMinutes
       from sites s join monitoring_companies mc on mc.id = s.monitoring_company_id
       where exists (select 1 from detectors d where d.site_id = s.id) order by s.id limit 1`,
    )
    const detector = one<{ id: number; tag: string }>('select id, tag from detectors where site_id = ? order by tag limit 1', s.id)
    const { status, body } = await get(`/sites/${s.id}`)
    expect(status).toBe(200)
    expect(body).toContain(s.phone)
    expect(body).toContain(`at least ${s.notifyLeadMinutes} minutes before work starts`)
    expect(body).toContain(html(detector.tag))
    expect(body).toContain(`href="/devices/${detector.id}"`)
    expect(body).toContain('Before any work: notify, then work.')
  })

  it('shows a unit with its interlock wiring and the requirement check', async () => {
    const units = all<{ id: number; shutdownInput: 'break-to-stop' | 'make-to-stop' }>(
      `select min(id) as id, shutdown_input as shutdownInput from units group by shutdown_input`,
    )
    expect(units.length).toBe(2)
    for (const u of units) {
      const { status, body } = await get(`/units/${u.id}`)
      expect(status).toBe(200)
      // Break-to-stop takes the auxiliary NC to the unit's stop input; make-to-stop takes NO to its shutdown input.
      if (u.shutdownInput === 'break-to-stop') expect(body).toContain('auxiliary contact NC')
      else expect(body).toContain('auxiliary contact NO')
      expect(body).toContain('auxiliary contact C')
      expect(body).toContain('Verify with the authority having jurisdiction (AHJ)')
      expect(body).toContain('24 VAC power budget')
      expect(body).toContain('Before any work: notify, then work.')
    }
  })

  it('lets every role read the pages and sends a visitor with no session to sign in', async () => {
    const paths = ['/customers/1', '/sites/1', '/units/1']
    for (const email of ['admin', 'lead', 'office', 'tech', 'manager'].map((r) => `${r}@ductkeeper.test`)) {
      const c = (await sessionCookieFor(data.db, userIdByEmail(data.db, email))).cookie
      for (const path of paths) {
        const res = await fetch(`${server.url}${path}`, { headers: { Cookie: c } })
        expect(res.status, `${path} as ${email}`).toBe(200)
        await res.body?.cancel()
      }
    }
    for (const path of paths) {
      const res = await fetch(`${server.url}${path}`, { redirect: 'manual' })
      expect(res.status, path).toBe(302)
      expect(res.headers.get('location') ?? '').toMatch(/^\/sign-in\?returnTo=/)
      await res.body?.cancel()
    }
  })

  it('answers 404 for ids that do not exist', async () => {
    for (const path of ['/customers/999999', '/sites/999999', '/units/999999']) {
      expect((await get(path)).status, path).toBe(404)
    }
  })

  it('answers 404 for ids that are not numbers', async () => {
    for (const path of ['/customers/abc', '/sites/1x', '/units/-3', '/units/1.5']) {
      expect((await get(path)).status, path).toBe(404)
    }
  })
})
