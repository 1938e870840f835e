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
      // A 10 % resistor as recorded, read by a ±1 % meter (from memory) with 10 Ω of contacts and leads
      // (common practice): (3.975 + 13,500) × 0.99 − 10 and (3.975 + 16,500) × 1.01 + 10.
      expected: {
        normal: { ohms: 15003.97, min: 13358.94, max: 16679.01 },
        alarm: { ohms: 3.98, min: 0, max: 14.01 },
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

  it('answers a GET with 405, the method it takes, and one log line', async () => {
    const from = server.output().length
    const res = await fetch(`${server.url}/api/diagnose`, { headers: { Cookie: tech, Accept: 'application/json' } })
    expect(res.status).toBe(405)
    expect(res.headers.get('allow')).toBe('POST')
    expect((await res.json()).error).toBe('Use POST.')
    await new Promise((r) => setTimeout(r, 200))
    const log = server.output().slice(from)
    expect(log.split('\n').filter((l) => l === 'GET /api/diagnose 405: Use POST.')).toHaveLength(1)
    expect(log).not.toMatch(/^\s+at /m)
  })

  it('takes the tolerance and alarm threshold as a detector records them, optional and given once', async () => {
    const { tolerance: _t, maxLineOhms: _m, ...bare } = arrangement
    const readings = { normal: 15420, alarm: 6.4, trouble: 'open', unpowered: 'open' }
    const asFraction = await (await post({ arrangement, readings })).json()
    const asRecorded = await (await post({ arrangement: { ...bare, eolTolerancePct: 10, alarmThresholdOhms: 100 }, readings })).json()
    expect(asRecorded).toEqual(asFraction)
    // Without them the engine's defaults apply: a 5 % part (common practice) makes the window narrower.
    const defaults = await (await post({ arrangement: bare, readings })).json()
    expect(defaults.expected.normal.max).toBeLessThan(asFraction.expected.normal.max)
    // A 16.2 kΩ reading is past a 5 % part of 15 kΩ but inside a 10 % one.
    expect((await (await post({ arrangement: bare, readings: { ...readings, normal: 16_200 } })).json()).verdict).toBe('fail')
    expect((await (await post({ arrangement: { ...bare, eolTolerancePct: 10 }, readings: { ...readings, normal: 16_200 } })).json()).verdict).toBe('pass')
    // A threshold of 20 Ω: 25 Ω in alarm is no longer a short the panel accepts.
    expect((await (await post({ arrangement: { ...bare, alarmThresholdOhms: 20 }, readings: { ...readings, alarm: 25 } })).json()).verdict).toBe('fail')
    const twice = await post({ arrangement: { ...arrangement, eolTolerancePct: 10 }, readings })
    expect(twice.status).toBe(400)
    expect((await twice.json()).issues.map((i: { path: string }) => i.path)).toContain('arrangement.eolTolerancePct')
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

  it('names a supervisory contact across the pair as a trouble that reaches the panel as an alarm', async () => {
    const res = await post({ arrangement, readings: { normal: 15004, alarm: 4, trouble: 4, unpowered: 4 } })
    const body = await res.json()
    expect(body.verdict).toBe('fail')
    expect(body.findings.map((f: { code: string }) => f.code)).toEqual(['trouble-reports-as-alarm'])
    expect(body.findings[0].message).toMatch(/false dispatch/)
  })

  it('refuses an EOL value outside the range used on initiating circuits, with the reason', async () => {
    // 470 Ω–100 kΩ (common practice): 4.7 typed for 4.7 k is a slip of units.
    const res = await post({ arrangement: { ...arrangement, eolOhms: 4.7 }, readings: {} })
    expect(res.status).toBe(400)
    const body = await res.json()
    expect(body.issues[0].message).toMatch(/below 470 Ω/)
    expect((await post({ arrangement: { ...arrangement, eolOhms: 220_000 } })).status).toBe(400)
  })

  it('is for roles that record work', async () => {
    const manager = (await sessionCookieFor(data.db, userIdByEmail(data.db, 'manager@ductkeeper.test'))).cookie
    expect((await post({ arrangement }, manager)).status).toBe(403)
    expect((await post({ arrangement }, '')).status).toBe(401)
  })
})
