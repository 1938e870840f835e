import { execFile } from 'node:child_process'
import { createHash } from 'node:crypto'
import { promisify } from 'node:util'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { createToken } from '~/.server/repos/tokens'
import { follow, go, Jar, signInViaProvider } from '#tests/setup/oauth-client'
import { startServer, TEST_CLIENT } from '#tests/setup/server'
import { sessionCookieFor, userIdByEmail } from '#tests/setup/sessions'
import { seededDb } from '#tests/setup/temp-db'

describe('sign-in, sessions and tokens', () => {
  let server: Awaited<ReturnType<typeof startServer>>
  let data: ReturnType<typeof seededDb>
  beforeAll(async () => {
    data = seededDb('small')
    server = await startServer(data.path)
  })
  afterAll(async () => {
    await server?.stop()
    data?.cleanup()
  })

  const me = (init: { cookie?: string; token?: string }) =>
    fetch(`${server.url}/api/me`, {
      headers: { ...(init.cookie ? { Cookie: init.cookie } : {}), ...(init.token ? { Authorization: `Bearer ${init.token}` } : {}) },
    })

  it('signs in through the provider, lands on the return path, and signs out for good', async () => {
    const { jar, callback } = await signInViaProvider(server.url, 'lead@ductkeeper.test', '/admin/audit?page=1')
    expect(callback.status).toBe(302)
    expect(callback.headers.get('location')).toBe('/admin/audit?page=1')
    const cookieLine = callback.headers.getSetCookie().find((c) => c.startsWith('__dk_session='))!
    expect(cookieLine).toMatch(/HttpOnly/i)
    expect(cookieLine).toMatch(/SameSite=Lax/i)
    // The strategy's state cookies are gone after the callback.
    expect([...jar.cookies.keys()].filter((k) => k.startsWith('dk_oauth'))).toEqual([])

    const cookie = `__dk_session=${jar.cookies.get('__dk_session')}`
    const who = await me({ cookie })
    expect(who.status).toBe(200)
    expect((await who.json()).user).toMatchObject({ email: 'lead@ductkeeper.test', role: 'lead' })

    const out = await signOutThroughProvider(jar)
    expect(out.landing).toBe(`${server.url}/sign-in?signed-out`)
    // The old cookie, replayed, is dead: the session record was revoked.
    expect((await me({ cookie })).status).toBe(401)
  })

  /** POST /sign-out, then the provider's end-session page (its form submitted as its script would), back to the app. */
  async function signOutThroughProvider(jar: Jar) {
    const out = await go(jar, `${server.url}/sign-out`, { method: 'POST', headers: { Origin: server.url } })
    expect(out.status).toBe(302)
    const endSession = new URL(out.headers.get('location')!)
    expect(endSession.origin).toBe(server.issuer)
    const page = await go(jar, endSession.toString())
    expect(page.status).toBe(200)
    const html = await page.text()
    const action = /<form id="op.logoutForm" method="post" action="([^"]+)"/.exec(html)![1]
    const fields = new URLSearchParams([...html.matchAll(/<input type="hidden" name="(\w+)" value="([^"]*)"/g)].map((m) => [m[1], m[2]]))
    // As the person answering "Yes, sign out" where the provider asks.
    fields.set('logout', 'yes')
    const confirm = await go(jar, new URL(action, endSession).toString(), {
      method: 'POST',
      headers: { 'Content-Type': 'application/x-www-form-urlencoded' },
      body: fields,
    })
    expect(confirm.status).toBe(303)
    return { endSession, html, landing: confirm.headers.get('location')! }
  }

  /** A second browser holding only the provider's cookies from the first. */
  function providerCookies(jar: Jar) {
    const copy = new Jar()
    copy.cookies = new Map([...jar.cookies].filter(([k]) => k.startsWith('idp_')))
    return copy
  }

  /** Starts a sign-in with the jar's cookies: where the provider sends the browser first. */
  async function providerAnswer(jar: Jar) {
    const start = await go(jar, `${server.url}/sign-in`, {
      method: 'POST',
      headers: { Origin: server.url, 'Content-Type': 'application/x-www-form-urlencoded' },
      body: new URLSearchParams({ returnTo: '/' }),
    })
    return (await follow(jar, start.headers.get('location')!, (u) => u.startsWith(`${server.url}/auth/callback`))).url
  }

  it('ends the provider session at sign-out, so the next person chooses an account', async () => {
    const { jar } = await signInViaProvider(server.url, 'office@ductkeeper.test')
    const sessionId = data.db.$client.prepare('select id_token as t from sessions where revoked_at is null and id_token is not null order by created_at desc limit 1').get() as { t: string }
    expect(sessionId.t.split('.')).toHaveLength(3)
    // While the provider session lives, a new sign-in in this browser comes straight back signed in as the same person.
    expect(await providerAnswer(providerCookies(jar))).toMatch(/\/auth\/callback\?/)

    const out = await signOutThroughProvider(jar)
    expect(out.endSession.searchParams.get('id_token_hint')).toBe(sessionId.t)
    expect(out.endSession.searchParams.get('post_logout_redirect_uri')).toBe(`${server.url}/sign-in?signed-out`)
    expect(out.landing).toBe(`${server.url}/sign-in?signed-out`)
    // Now the provider asks who is signing in.
    expect(await providerAnswer(jar)).toMatch(/\/interaction\/[\w-]+$/)
  })

  it('lets a refused person choose another account', async () => {
    const { jar, callback } = await signInViaProvider(server.url, 'visitor@ductkeeper.test')
    expect(callback.status).toBe(403)
    expect(await callback.text()).toContain('Sign in with another account')
    // Trying again as they are would bring the same refused person back.
    expect(await providerAnswer(providerCookies(jar))).toMatch(/\/auth\/callback\?/)
    const out = await signOutThroughProvider(jar)
    // No session, no ID token: the client id vouches for the way back, and the provider asks first.
    expect(out.endSession.searchParams.get('client_id')).toBe(TEST_CLIENT.id)
    expect(out.html).toContain('Yes, sign out')
    expect(out.landing).toBe(`${server.url}/sign-in?signed-out`)
    expect(await providerAnswer(jar)).toMatch(/\/interaction\/[\w-]+$/)
    const next = await signInViaProvider(server.url, 'tech@ductkeeper.test')
    expect(next.callback.status).toBe(302)
  })

  it('starts a sign-in only with POST, whatever its address carries', async () => {
    const post = (query: string, method = 'POST') =>
      fetch(`${server.url}/sign-in${query}`, { method, redirect: 'manual', headers: { Origin: server.url, 'Content-Type': 'application/x-www-form-urlencoded' }, body: 'returnTo=%2F' })
    // A state and code in the address are the provider's answer's, never this form's.
    const strayed = await post('?state=abc&code=xyz')
    expect(strayed.status).toBe(302)
    expect(new URL(strayed.headers.get('location')!).origin).toBe(server.issuer)
    expect((await post('', 'DELETE')).status).toBe(405)
  })

  it('refuses a person the provider knows but Ductkeeper does not', async () => {
    const { callback } = await signInViaProvider(server.url, 'visitor@ductkeeper.test')
    expect(callback.status).toBe(403)
    const html = await callback.text()
    expect(html).toContain('visitor@ductkeeper.test')
    expect(html).toContain('not set up in Ductkeeper')
    expect(callback.headers.getSetCookie().some((c) => c.startsWith('__dk_session=') && !c.includes('Max-Age=0'))).toBe(false)
  })

  it('refuses a deactivated user at sign-in', async () => {
    data.db.$client.prepare("update users set active = 0 where email = 'manager@ductkeeper.test'").run()
    const { callback } = await signInViaProvider(server.url, 'manager@ductkeeper.test')
    expect(callback.status).toBe(403)
    expect(await callback.text()).toContain('deactivated')
    data.db.$client.prepare("update users set active = 1 where email = 'manager@ductkeeper.test'").run()
  })

  it('refuses a replayed callback (used code) and a wrong state', async () => {
    const first = await signInViaProvider(server.url, 'office@ductkeeper.test')
    expect(first.callback.status).toBe(302)
    // Replay with the original state cookie: the code was spent.
    const replayJar = new Jar()
    replayJar.cookies = new Map(first.oauthCookies)
    expect((await go(replayJar, first.callbackUrl)).status).toBe(400)
    // Same cookies, state changed in the URL.
    const tampered = new URL(first.callbackUrl)
    tampered.searchParams.set('state', 'not-the-state')
    expect((await go(replayJar, tampered.toString())).status).toBe(400)
    // No state cookie at all.
    expect((await fetch(first.callbackUrl, { redirect: 'manual' })).status).toBe(400)
  })

  it('never sends anyone off-site after sign-in', async () => {
    for (const target of ['//evil.test/x', 'https://evil.test', '/\\evil.test', 'javascript:alert(1)']) {
      const page = await fetch(`${server.url}/sign-in?returnTo=${encodeURIComponent(target)}`)
      expect(await page.text()).toContain('name="returnTo" value="/"')
      const { callback } = await signInViaProvider(server.url, 'tech@ductkeeper.test', target)
      expect(callback.headers.get('location')).toBe('/')
    }
  })

  it('refuses tampered, expired and idle session cookies', async () => {
    const userId = userIdByEmail(data.db, 'tech@ductkeeper.test')
    const good = await sessionCookieFor(data.db, userId)
    expect((await me({ cookie: good.cookie })).status).toBe(200)
    const [name, value] = good.cookie.split('=')
    // Change the signed payload: the signature no longer matches.
    const flipped = (value[0] === 'e' ? 'f' : 'e') + value.slice(1)
    expect((await me({ cookie: `${name}=${flipped}` })).status).toBe(401)
    const expired = await sessionCookieFor(data.db, userId, { expiresAt: new Date(Date.now() - 1000) })
    expect((await me({ cookie: expired.cookie })).status).toBe(401)
    const idle = await sessionCookieFor(data.db, userId, { lastSeenAt: new Date(Date.now() - 3 * 3_600_000) })
    expect((await me({ cookie: idle.cookie })).status).toBe(401)
    const page = await fetch(`${server.url}/`, { headers: { Cookie: expired.cookie }, redirect: 'manual' })
    expect(page.status).toBe(302)
    expect(page.headers.get('location')).toBe('/sign-in?returnTo=%2F')
  })

  it('runs the token lifecycle: create from the shell, use, revoke; expired refused; hashed at rest', async () => {
    // Run without blocking this process: a blocked test cannot notice the server closing an idle
    // keep-alive socket, and its next request would go out on the closed one.
    const token = (
      await promisify(execFile)('node_modules/.bin/tsx', ['scripts/token.ts', '--email', 'office@ductkeeper.test', '--name', 'Export job'], {
        env: { ...process.env, DATABASE_PATH: data.path },
        encoding: 'utf8',
      })
    ).stdout.trim()
    expect(token).toMatch(/^dk_[0-9a-f]{8}_[\w-]{20,}$/)
    const used = await me({ token })
    expect(used.status).toBe(200)
    expect(await used.json()).toMatchObject({ via: 'token', user: { email: 'office@ductkeeper.test' } })

    // At rest: only the SHA-256, never the text.
    const dump = JSON.stringify(data.db.$client.prepare('select * from api_tokens').all())
    expect(dump).not.toContain(token)
    // The secret is everything after the prefix (base64url, so it may hold underscores itself).
    expect(dump).not.toContain(token.split('_').slice(2).join('_'))
    expect(dump).toContain(createHash('sha256').update(token).digest('hex'))

    // Revoke through the admin page, as an administrator would.
    const row = data.db.$client.prepare("select id from api_tokens where name = 'Export job'").get() as { id: number }
    const admin = await sessionCookieFor(data.db, userIdByEmail(data.db, 'admin@ductkeeper.test'))
    const revoke = await fetch(`${server.url}/admin/tokens`, {
      method: 'POST',
      headers: { Cookie: admin.cookie, Origin: server.url, 'Content-Type': 'application/x-www-form-urlencoded' },
      body: new URLSearchParams({ intent: 'revoke', tokenId: String(row.id) }),
    })
    expect(revoke.status).toBe(200)
    expect((await me({ token })).status).toBe(401)
    const audit = data.db.$client.prepare("select action from audit_log where entity = 'api_token' order by id").all()
    expect(audit).toEqual([{ action: 'token.create' }, { action: 'token.revoke' }])

    const expired = createToken(data.db, { userId: userIdByEmail(data.db, 'lead@ductkeeper.test'), name: 'Old', expiresAt: new Date(Date.now() - 1000), actorId: null })
    expect((await me({ token: expired.token })).status).toBe(401)
    const unauth = await me({ token: 'dk_00000000_nope' })
    expect(unauth.status).toBe(401)
    expect(await unauth.json()).toHaveProperty('error')
  })

  it('keeps the last active administrator', async () => {
    const adminId = userIdByEmail(data.db, 'admin@ductkeeper.test')
    const admin = await sessionCookieFor(data.db, adminId)
    const post = (body: Record<string, string>) =>
      fetch(`${server.url}/admin/users`, {
        method: 'POST',
        headers: { Cookie: admin.cookie, Origin: server.url, 'Content-Type': 'application/x-www-form-urlencoded' },
        body: new URLSearchParams(body),
      })
    const demote = await post({ intent: 'change-role', userId: String(adminId), role: 'office' })
    expect(demote.status).toBe(409)
    expect(await demote.text()).toContain('last active administrator')
    expect((await post({ intent: 'deactivate', userId: String(adminId) })).status).toBe(409)
    const bad = await post({ intent: 'invite', email: 'not-an-email', name: 'X', role: 'boss' })
    expect(bad.status).toBe(400)
    const invited = await post({ intent: 'invite', email: 'New.Person@Example.test', name: 'New Person', role: 'technician' })
    expect(invited.status).toBe(200)
    expect(data.db.$client.prepare("select role, active from users where email = 'new.person@example.test'").get()).toEqual({ role: 'technician', active: 1 })
  })
})
