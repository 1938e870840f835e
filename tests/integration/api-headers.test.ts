import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { go, signInViaProvider } from '#tests/setup/oauth-client'
import { startServer } from '#tests/setup/server'
import { seededDb } from '#tests/setup/temp-db'

describe('API response headers', () => {
  let server: Awaited<ReturnType<typeof startServer>>
  let data: ReturnType<typeof seededDb>
  beforeAll(async () => {
    data = seededDb('small')
    server = await startServer(data.path, { DUCTKEEPER_JOBS: 'off' })
  }, 30_000)
  afterAll(async () => {
    await server?.stop()
    data?.cleanup()
  })

  it('marks answers and refusals alike as not to be sniffed or stored', async () => {
    const refused = await fetch(`${server.url}/api/devices`)
    expect(refused.status).toBe(401)
    expect(refused.headers.get('x-content-type-options')).toBe('nosniff')
    expect(refused.headers.get('cache-control')).toBe('no-store')

    const { jar } = await signInViaProvider(server.url, 'office@ductkeeper.test')
    for (const path of ['/api/me', '/api/devices?limit=5', '/api/search?q=kettle', '/api/devices?limit=abc']) {
      const res = await go(jar, `${server.url}${path}`)
      expect([200, 400]).toContain(res.status)
      expect(res.headers.get('x-content-type-options'), path).toBe('nosniff')
      expect(res.headers.get('cache-control'), path).toBe('no-store')
    }
    const rows = (await (await go(jar, `${server.url}/api/devices?limit=5`)).json()) as { rows: unknown[] }
    expect(rows.rows).toHaveLength(5)

    // A method the address has no handler for is refused in words, in the shape of every refusal.
    const wrong = await go(jar, `${server.url}/api/devices`, { method: 'DELETE' })
    expect(wrong.status).toBe(405)
    expect(await wrong.json()).toEqual({ error: '/api/devices does not take DELETE.' })
    expect(wrong.headers.get('x-content-type-options')).toBe('nosniff')
  })

  it('answers an address no API route serves with a JSON 404, logged in one line', async () => {
    const { jar } = await signInViaProvider(server.url, 'office@ductkeeper.test')
    const before = server.output().length
    for (const [path, init] of [
      ['/api/nope', {}],
      ['/api/devices/12/nope', {}],
      ['/api/nope', { method: 'POST', headers: { Origin: server.url, 'Content-Type': 'application/json' }, body: '{}' }],
    ] as const) {
      for (const signedIn of [true, false]) {
        const res = signedIn ? await go(jar, `${server.url}${path}`, init) : await fetch(`${server.url}${path}`, init)
        const label = `${init.method ?? 'GET'} ${path} ${signedIn ? 'signed in' : 'signed out'}`
        expect(res.status, label).toBe(404)
        expect(res.headers.get('content-type'), label).toMatch(/^application\/json/)
        expect(res.headers.get('x-content-type-options'), label).toBe('nosniff')
        expect(res.headers.get('cache-control'), label).toBe('no-store')
        const body = (await res.json()) as { error?: unknown }
        expect(typeof body.error, label).toBe('string')
      }
    }
    // A write to it from another site is refused like any other write.
    const foreign = await go(jar, `${server.url}/api/nope`, { method: 'POST', headers: { 'Sec-Fetch-Site': 'cross-site' } })
    expect(foreign.status).toBe(403)
    // The log says what was asked for in a line each, with no stack.
    await new Promise((r) => setTimeout(r, 100))
    const log = server.output().slice(before)
    expect(log).toContain('GET /api/nope 404')
    expect(log).not.toMatch(/^\s+at /m)
  })

  it('refuses GET on the routes that only take POST with 405 and the method they take', async () => {
    const { jar } = await signInViaProvider(server.url, 'office@ductkeeper.test')
    for (const path of ['/api/bulk/reschedule', '/api/bulk/undo', '/api/import', '/api/import/abc', '/api/diagnose']) {
      const res = await go(jar, `${server.url}${path}`)
      expect(res.status, path).toBe(405)
      expect(res.headers.get('allow'), path).toBe('POST')
      expect(res.headers.get('x-content-type-options'), path).toBe('nosniff')
      expect(((await res.json()) as { error?: unknown }).error, path).toBe('Use POST.')
    }
    // Signed out, the address still asks for credentials first.
    expect((await fetch(`${server.url}/api/bulk/undo`)).status).toBe(401)
  })

  it('leaves pages alone', async () => {
    const res = await fetch(`${server.url}/sign-in`)
    expect(res.headers.get('cache-control')).toBeNull()
  })
})
