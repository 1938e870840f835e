import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest'

// The module keeps a once-only flag for leaving to sign-in: load a fresh copy per test.
const load = async () => {
  vi.resetModules()
  return import('./fetch-json')
}

describe('fetchJson', () => {
  const assign = vi.fn()
  beforeEach(() => {
    assign.mockReset()
    vi.stubGlobal('window', { location: { pathname: '/sites', search: '?q=birch&sort=city', hash: '', assign } })
  })
  afterEach(() => vi.unstubAllGlobals())

  const answer = (status: number, body: unknown) => vi.fn(async (_url: string, _init?: RequestInit) => new Response(JSON.stringify(body), { status, headers: { 'Content-Type': 'application/json' } }))

  it('returns the parsed body and marks timed refreshes', async () => {
    const fetch = answer(200, { rows: [1, 2] })
    vi.stubGlobal('fetch', fetch)
    const { fetchJson } = await load()
    await expect(fetchJson('/api/sites', { background: true })).resolves.toEqual({ rows: [1, 2] })
    const headers = new Headers(fetch.mock.calls[0][1]?.headers)
    expect(headers.get('X-Background-Refresh')).toBe('1')
    await fetchJson('/api/sites')
    expect(new Headers(fetch.mock.calls[1][1]?.headers).get('X-Background-Refresh')).toBeNull()
  })

  it('throws the server’s own message with the status', async () => {
    vi.stubGlobal('fetch', answer(409, { error: 'You already have a view named “A”.', conflict: { id: 3 } }))
    const { fetchJson, FetchError } = await load()
    const error = await fetchJson('/api/views', { method: 'POST', json: {} }).catch((e: unknown) => e)
    expect(error).toBeInstanceOf(FetchError)
    expect(error).toMatchObject({ status: 409, message: 'You already have a view named “A”.', body: { conflict: { id: 3 } } })
  })

  it('prefers the first validation issue', async () => {
    vi.stubGlobal('fetch', answer(400, { error: 'Invalid query', issues: [{ path: 'to', message: 'The end date comes before the start date' }] }))
    const { fetchJson } = await load()
    await expect(fetchJson('/api/visits?from=2026-06-20&to=2026-06-01')).rejects.toThrow('The end date comes before the start date')
  })

  it('sends a 401 to sign-in once, with the way back to this page', async () => {
    vi.stubGlobal('fetch', answer(401, { error: 'Sign in or send a valid API token.' }))
    const { fetchJson } = await load()
    await expect(fetchJson('/api/sites')).rejects.toMatchObject({ status: 401 })
    await expect(fetchJson('/api/sites?offset=100')).rejects.toMatchObject({ status: 401 })
    expect(assign).toHaveBeenCalledTimes(1)
    expect(assign).toHaveBeenCalledWith('/sign-in?returnTo=%2Fsites%3Fq%3Dbirch%26sort%3Dcity')
  })

  it('names a lost connection and an answer that is not JSON', async () => {
    vi.stubGlobal('fetch', vi.fn(async () => Promise.reject(new TypeError('Failed to fetch'))))
    const { fetchJson } = await load()
    await expect(fetchJson('/api/sites')).rejects.toMatchObject({ status: 0, message: expect.stringContaining('could not be reached') })
    vi.stubGlobal('fetch', vi.fn(async () => new Response('<html>bad gateway</html>', { status: 502 })))
    await expect(fetchJson('/api/sites')).rejects.toMatchObject({ status: 502, message: 'The server could not answer. Try again in a moment.' })
  })
})
