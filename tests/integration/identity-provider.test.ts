import { createHash, randomBytes } from 'node:crypto'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { DEMO_DIRECTORY, startIdentityProvider, type RunningIdp } from '../../mocks/identity-provider'

const clientId = 'ductkeeper-test'
const clientSecret = 'test-secret'
const redirectUri = 'http://localhost:3000/auth/callback'

// Just enough of a cookie jar for one host: the provider's cookies carry paths, but sending them all is harmless.
function cookieJar() {
  const cookies = new Map<string, string>()
  return {
    store(res: Response) {
      for (const line of res.headers.getSetCookie()) {
        const [pair, ...attrs] = line.split(';')
        const eq = pair.indexOf('=')
        const name = pair.slice(0, eq).trim()
        const value = pair.slice(eq + 1).trim()
        const expired = attrs.some((a) => /^\s*expires=/i.test(a) && Date.parse(a.split('=')[1]) < Date.now())
        if (expired || value === '') cookies.delete(name)
        else cookies.set(name, value)
      }
    },
    header: () => [...cookies].map(([k, v]) => `${k}=${v}`).join('; '),
  }
}

type Jar = ReturnType<typeof cookieJar>

/** Follows redirects by hand, keeping cookies, and stops at the app's redirect_uri (which nothing serves here). */
async function follow(jar: Jar, url: string, init: RequestInit = {}): Promise<{ url: string; res?: Response }> {
  for (let hop = 0; hop < 10; hop++) {
    const res = await fetch(url, { ...init, redirect: 'manual', headers: { ...init.headers, cookie: jar.header() } })
    jar.store(res)
    const location = res.headers.get('location')
    if (res.status < 300 || res.status >= 400 || !location) return { url, res }
    url = new URL(location, url).href
    if (url.startsWith(redirectUri)) return { url }
    init = {}
  }
  throw new Error('too many redirects')
}

const b64url = (buf: Buffer) => buf.toString('base64url')

function authorizeUrl(endpoint: string, params: Record<string, string>) {
  const url = new URL(endpoint)
  const all = { client_id: clientId, redirect_uri: redirectUri, response_type: 'code', scope: 'openid email profile', ...params }
  for (const [k, v] of Object.entries(all)) url.searchParams.set(k, v)
  return url.href
}

describe('local stand-in identity provider', () => {
  let idp: RunningIdp
  let config: { authorization_endpoint: string; token_endpoint: string; issuer: string }
  const basic = `Basic ${Buffer.from(`${clientId}:${clientSecret}`).toString('base64')}`

  beforeAll(async () => {
    idp = await startIdentityProvider({ port: 0, clientId, clientSecret, redirectUris: [redirectUri], accounts: DEMO_DIRECTORY })
    config = await (await fetch(`${idp.issuer}/.well-known/openid-configuration`)).json()
  })
  afterAll(() => idp?.close())

  async function openLoginPage(jar: Jar, params: Record<string, string>) {
    const { url, res } = await follow(jar, authorizeUrl(config.authorization_endpoint, params))
    expect(res?.status).toBe(200)
    return { url, html: await res!.text() }
  }

  function tokenRequest(code: string, verifier: string) {
    return fetch(config.token_endpoint, {
      method: 'POST',
      headers: { authorization: basic, 'content-type': 'application/x-www-form-urlencoded' },
      body: new URLSearchParams({ grant_type: 'authorization_code', code, redirect_uri: redirectUri, code_verifier: verifier }),
    })
  }

  it('signs a directory member in with the authorization code flow and PKCE', async () => {
    expect(config.issuer).toBe(idp.issuer)
    const jar = cookieJar()
    const verifier = b64url(randomBytes(32))
    const challenge = b64url(createHash('sha256').update(verifier).digest())
    const state = b64url(randomBytes(16))

    const login = await openLoginPage(jar, { code_challenge: challenge, code_challenge_method: 'S256', state })
    expect(login.html).toContain('stand-in')
    for (const { email } of DEMO_DIRECTORY) expect(login.html).toContain(email)

    const done = await follow(jar, `${login.url}/login`, {
      method: 'POST',
      headers: { 'content-type': 'application/x-www-form-urlencoded' },
      body: new URLSearchParams({ email: 'lead@ductkeeper.test' }),
    })
    const callback = new URL(done.url)
    expect(callback.origin + callback.pathname).toBe(redirectUri)
    expect(callback.searchParams.get('state')).toBe(state)
    const code = callback.searchParams.get('code')
    expect(code).toBeTruthy()

    const res = await tokenRequest(code!, verifier)
    expect(res.status).toBe(200)
    const tokens = await res.json()
    expect(tokens.access_token).toBeTruthy()
    const claims = JSON.parse(Buffer.from(tokens.id_token.split('.')[1], 'base64url').toString())
    expect(claims).toMatchObject({ email: 'lead@ductkeeper.test', email_verified: true, name: 'Priya Castellano', aud: clientId })

    const replay = await tokenRequest(code!, verifier)
    expect(replay.status).toBe(400)
    expect((await replay.json()).error).toBe('invalid_grant')
  })

  it('refuses an authorization request without a code challenge', async () => {
    const { url, res } = await follow(cookieJar(), authorizeUrl(config.authorization_endpoint, { state: 'x' }))
    if (res) expect(res.status).toBe(400)
    else expect(new URL(url).searchParams.get('error')).toBe('invalid_request')
  })

  it('turns away someone outside the directory, and reports a cancelled sign-in as access_denied', async () => {
    const jar = cookieJar()
    const challenge = b64url(createHash('sha256').update('v'.repeat(43)).digest())
    const login = await openLoginPage(jar, { code_challenge: challenge, code_challenge_method: 'S256', state: 's' })
    const form = { method: 'POST', headers: { 'content-type': 'application/x-www-form-urlencoded' } }

    const stranger = await follow(jar, `${login.url}/login`, { ...form, body: 'email=nobody%40elsewhere.test' })
    expect(stranger.res?.status).toBe(400)

    const cancelled = await follow(jar, `${login.url}/cancel`, { ...form, body: '' })
    expect(new URL(cancelled.url).searchParams.get('error')).toBe('access_denied')
  })
})
