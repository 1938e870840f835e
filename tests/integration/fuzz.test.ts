import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { builtRoutes, casesFor, describeFindings, runCases, type FuzzRoute } from '#tests/setup/fuzz'
import { startServer } from '#tests/setup/server'
import { sessionCookieFor, userIdByEmail } from '#tests/setup/sessions'
import { DEMO_EMAIL } from '#tests/setup/fixture'
import { seededDb } from '#tests/setup/temp-db'

// The short run: two hostile requests per route. `npm run test:proof` runs the long one.
describe('hostile input on every route (short run)', () => {
  let server: Awaited<ReturnType<typeof startServer>>
  let data: ReturnType<typeof seededDb>
  let routes: FuzzRoute[]
  beforeAll(async () => {
    routes = await builtRoutes()
    data = seededDb('small')
    server = await startServer(data.path, { DUCTKEEPER_JOBS: 'off' })
  })
  afterAll(async () => {
    await server?.stop()
    data?.cleanup()
  })

  it('answers every route without a 5xx, a change from a refused request, or raw markup', async () => {
    expect(routes.some((r) => r.pattern.startsWith('/api/') && r.action)).toBe(true)
    const seed = Number(process.env.FUZZ_SEED ?? 20261202)
    const { findings, statuses } = await runCases(casesFor(routes, 2, seed), { url: server.url, db: data.db })
    expect(findings, `seed ${seed}\n${describeFindings(findings)}`).toEqual([])
    // The run reached past the refusals at the door: some requests were read and refused for their content.
    expect(statuses[400] ?? 0).toBeGreaterThan(0)
    expect(statuses[200] ?? 0).toBeGreaterThan(0)
  }, 120_000)

  it('logs an unknown address and a method a route does not take in one line each, with no stack', async () => {
    const { cookie } = await sessionCookieFor(data.db, userIdByEmail(data.db, DEMO_EMAIL.admin))
    const mark = `fuzz-${Date.now()}`
    const before = server.output().length
    const missing = await fetch(`${server.url}/api/${mark}`, { headers: { Cookie: cookie } })
    expect(missing.status).toBe(404)
    const page = await fetch(`${server.url}/${mark}`, { headers: { Cookie: cookie } })
    expect(page.status).toBe(404)
    const wrong = await fetch(`${server.url}/api/search?q=a`, { method: 'DELETE', headers: { Cookie: cookie, Origin: server.url } })
    expect(wrong.status).toBe(405)
    await new Promise((r) => setTimeout(r, 200))
    const log = server.output().slice(before)
    // One line each from the error handler (the access log adds its own line per request).
    const lines = log.split('\n').filter((l) => /^\S+ \S+ 40[45]: /.test(l))
    expect(lines.filter((l) => l.includes(mark))).toHaveLength(2)
    expect(lines.some((l) => l.startsWith('DELETE /api/search 405:'))).toBe(true)
    expect(log).not.toMatch(/^\s+at /m)
  })
})
