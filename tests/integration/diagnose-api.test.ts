import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { startServer } from '#tests/setup/server'
import { sessionCookieFor, userIdByEmail } from '#tests/setup/sessions'
import { seededDb } from '#tests/setup/temp-db'

const arrangement = {
  eolOhms: 15000,
  eolPlacement: 'through-supervisory',
  alarmTerminal: 'NO',
  supervisoryTerminal: 'NO',
  supervisoryLabelledIn: 'de-energized',
  conductor: { awg: 18, stranded: true, oneWayFeet: 250 },
  measuredAt: 'panel',
  tolerance: 0.1,
  maxLineOhms: 100,
}

describe('POST /api/diagnose', () => {
  let server: Awaited<ReturnType<typeof startServer>>
  let data: ReturnType<typeof seededDb>
  let tech = ''
  beforeAll(async () => {
    data = seededDb('small')
    server = await startServer(data.path)
    tech = (await sessionCookieFor(data.db, userIdByEmail(data.db, 'tech@ductkeeper.test'))).cookie
  })
  afterAll(async () => {
    await server?.stop()
    data?.cleanup()
  })

  const post = (body: unknown, cookie = tech) =>
    fetch(`${server.url}/api/diagnose`, {
      method: 'POST',
      headers: { Cookie: cookie, Origin: server.url, 'Content-Type': 'application/json' },
      body: typeof body === 'string' ? body : JSON.stringify(body),
    })

  it('answers the documented contract', async () => {
    const res = await post({ arrangement, readings: { normal: 15420, alarm: 6.4, trouble: 'open', unpowered: 'open' } })
    expect(res.status).toBe(200)
    const body = await res.json()
    expect(body).toEqual({
      expected: {
        normal: { ohms: 15003.98, min: 13503.98, max: 16503.97 },
        alarm: { ohms: 3.98, min: 0, max: 13.98 },
        trouble: { open: true },
        unpowered: { open: true },
      },
      lineOhms: 3.975,
      verdict: 'pass',
      findings: [],
    })
  })

  it('names the miswire as readings come in', async () => {
    const res = await post({ arrangement, readings: { normal: 4.1, alarm: 15010, trouble: 4.0 } })
    const body = await res.json()
    expect(body.verdict).toBe('fail')
    expect(body.findings).toEqual([expect.objectContaining({ code: 'alarm-on-nc', state: 'normal' })])
    expect(typeof body.findings[0].message).toBe('string')
  })

  it('refuses bad input with the issues', async () => {
    const bad = await post({ arrangement: { ...arrangement, eolOhms: -5, conductor: { awg: 20, stranded: true, oneWayFeet: 10 } }, readings: { normal: 'shorted' } })
    expect(bad.status).toBe(400)
    const body = await bad.json()
    expect(body.error).toBe('Invalid request')
    const paths = body.issues.map((i: { path: string }) => i.path)
    expect(paths).toEqual(expect.arrayContaining(['arrangement.eolOhms', 'arrangement.conductor.awg', 'readings.normal']))
    expect((await post('{not json')).status).toBe(400)
    expect((await post({ arrangement, readings: { sideways: 3 } })).status).toBe(400)
  })

  it('is for roles that record work', async () => {
    const manager = (await sessionCookieFor(data.db, userIdByEmail(data.db, 'manager@ductkeeper.test'))).cookie
    expect((await post({ arrangement }, manager)).status).toBe(403)
    expect((await post({ arrangement }, '')).status).toBe(401)
  })
})
