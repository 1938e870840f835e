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

  it('leaves pages alone', async () => {
    const res = await fetch(`${server.url}/sign-in`)
    expect(res.headers.get('cache-control')).toBeNull()
  })
})
