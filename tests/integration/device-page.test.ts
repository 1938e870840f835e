import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { startServer } from '#tests/setup/server'
import { sessionCookieFor, userIdByEmail } from '#tests/setup/sessions'
import { seededDb } from '#tests/setup/temp-db'

describe('device page', () => {
  let server: Awaited<ReturnType<typeof startServer>>
  let data: ReturnType<typeof seededDb>
  let cookie = ''
  beforeAll(async () => {
    data = seededDb('small')
    server = await startServer(data.path)
    cookie = (await sessionCookieFor(data.db, userIdByEmail(data.db, 'tech@ductkeeper.test'))).cookie
  })
  afterAll(async () => {
    await server?.stop()
    data?.cleanup()
  })

  const page = async (id: number) => {
    const res = await fetch(`${server.url}/devices/${id}`, { headers: { Cookie: cookie } })
    return { status: res.status, html: await res.text() }
  }

  it('draws each arrangement in the data with its own wiring, and flags recorded faults', async () => {
    const arrangements = data.db.$client
      .prepare(
        `select min(id) as id, eol_placement as placement, alarm_terminal as alarm, supervisory_terminal as sup
         from detectors group by eol_placement, alarm_terminal, supervisory_terminal`,
      )
      .all() as Array<{ id: number; placement: string; alarm: string; sup: string }>
    expect(arrangements.length).toBeGreaterThanOrEqual(3)
    for (const a of arrangements) {
      const { status, html } = await page(a.id)
      expect(status).toBe(200)
      expect(html).toContain(`alarm contact ${a.alarm} across the loop`)
      expect(html).toContain(a.placement === 'across-pair' ? 'resistor straight across the loop' : `resistor through supervisory ${a.sup}`)
      if (a.alarm === 'NC') expect(html).toContain('alarm-on-nc')
      if (a.placement === 'across-pair') expect(html).toContain('not-supervised')
      expect(html).toContain('Before any work: notify, then work.')
    }
  })

  it('answers 404 for a detector that does not exist', async () => {
    expect((await page(999_999)).status).toBe(404)
  })
})
