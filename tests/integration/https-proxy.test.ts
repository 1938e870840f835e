import { execFileSync, spawn, type ChildProcess } from 'node:child_process'
import { mkdtempSync, readFileSync, rmSync } from 'node:fs'
import { request as httpRequest } from 'node:http'
import { createServer, type Server } from 'node:https'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { DEMO_DIRECTORY, startIdentityProvider, type RunningIdp } from '../../mocks/identity-provider'
import { go, signInViaProvider } from '#tests/setup/oauth-client'
import { freePort, TEST_CLIENT, TEST_SESSION_SECRET } from '#tests/setup/server'
import { seededDb, TEST_TODAY } from '#tests/setup/temp-db'

// Self-signed for this run only; the test's own fetch calls accept it.
process.env.NODE_TLS_REJECT_UNAUTHORIZED = '0'

function selfSignedCert(dir: string) {
  const key = join(dir, 'key.pem')
  const cert = join(dir, 'cert.pem')
  execFileSync('openssl', ['req', '-x509', '-newkey', 'rsa:2048', '-nodes', '-keyout', key, '-out', cert, '-days', '1', '-subj', '/CN=localhost'], { stdio: 'ignore' })
  return { key: readFileSync(key), cert: readFileSync(cert) }
}

/** A TLS-terminating proxy as a deployment runs one: plain http to loopback, X-Forwarded-* set. */
function startProxy(tls: { key: Buffer; cert: Buffer }, port: number, target: number): Promise<Server> {
  const server = createServer(tls, (req, res) => {
    const upstream = httpRequest(
      {
        host: '127.0.0.1',
        port: target,
        method: req.method,
        path: req.url,
        headers: { ...req.headers, host: `127.0.0.1:${target}`, 'x-forwarded-proto': 'https', 'x-forwarded-host': req.headers.host ?? '' },
      },
      (up) => {
        res.writeHead(up.statusCode ?? 502, up.headers)
        up.pipe(res)
      },
    )
    upstream.on('error', () => res.writeHead(502).end())
    req.pipe(upstream)
  })
  return new Promise((resolve) => server.listen(port, '127.0.0.1', () => resolve(server)))
}

describe('behind an HTTPS reverse proxy', () => {
  let data: ReturnType<typeof seededDb>
  let idp: RunningIdp
  let app: ChildProcess
  let proxy: Server
  let certDir: string
  let appUrl: string
  let output = ''

  beforeAll(async () => {
    data = seededDb('small')
    certDir = mkdtempSync(join(tmpdir(), 'dk-tls-'))
    const [appPort, proxyPort] = [await freePort(), await freePort()]
    appUrl = `https://localhost:${proxyPort}`
    idp = await startIdentityProvider({ port: 0, clientId: TEST_CLIENT.id, clientSecret: TEST_CLIENT.secret, redirectUris: [`${appUrl}/auth/callback`], accounts: DEMO_DIRECTORY })
    app = spawn('node_modules/.bin/react-router-serve', ['build/server/index.js'], {
      env: {
        ...process.env,
        NODE_ENV: 'production',
        DATABASE_PATH: data.path,
        PORT: String(appPort),
        HOST: '127.0.0.1',
        SESSION_SECRET: TEST_SESSION_SECRET,
        OFFICE_TODAY: TEST_TODAY,
        APP_URL: appUrl,
        OIDC_ISSUER: idp.issuer,
        OIDC_CLIENT_ID: TEST_CLIENT.id,
        OIDC_CLIENT_SECRET: TEST_CLIENT.secret,
      },
      stdio: ['ignore', 'pipe', 'pipe'],
    })
    app.stdout!.on('data', (d) => (output += d))
    app.stderr!.on('data', (d) => (output += d))
    proxy = await startProxy(selfSignedCert(certDir), proxyPort, appPort)
    for (let i = 0; ; i++) {
      if (app.exitCode !== null) throw new Error(`server exited:\n${output}`)
      const ok = await fetch(`${appUrl}/healthz`).then((r) => r.ok, () => false)
      if (ok) break
      if (i > 200) throw new Error(`server did not answer:\n${output}`)
      await new Promise((r) => setTimeout(r, 100))
    }
  }, 30_000)

  afterAll(async () => {
    await new Promise<void>((resolve) => proxy?.close(() => resolve()))
    if (app && app.exitCode === null) {
      const exited = new Promise((r) => app.once('exit', r))
      app.kill('SIGTERM')
      await exited
    }
    await idp?.close()
    data?.cleanup()
    rmSync(certDir, { recursive: true, force: true })
  })

  it('signs in, saves a form and signs out over https, with Secure cookies', async () => {
    const { jar, callback } = await signInViaProvider(appUrl, 'admin@ductkeeper.test', '/admin/tokens')
    expect(callback.status).toBe(302)
    expect(callback.headers.get('location')).toBe('/admin/tokens')
    const session = callback.headers.getSetCookie().find((c) => c.startsWith('__dk_session='))
    expect(session).toMatch(/;\s*Secure/i)

    const me = await go(jar, `${appUrl}/api/me`)
    expect(me.status).toBe(200)
    const { user } = (await me.json()) as { user: { id: number; email: string } }
    expect(user.email).toBe('admin@ductkeeper.test')

    const before = (data.db.$client.prepare('select count(*) as n from api_tokens').get() as { n: number }).n
    const saved = await go(jar, `${appUrl}/admin/tokens`, {
      method: 'POST',
      headers: { Origin: appUrl, 'Content-Type': 'application/x-www-form-urlencoded' },
      body: new URLSearchParams({ intent: 'create', userId: String(user.id), name: 'Behind the proxy', expiresInDays: '30' }),
    })
    expect(saved.status).toBe(200)
    expect(await saved.text()).toContain('Behind the proxy')
    expect((data.db.$client.prepare('select count(*) as n from api_tokens').get() as { n: number }).n).toBe(before + 1)

    // Another site's form is still refused, whatever the proxy forwards.
    const foreign = await go(jar, `${appUrl}/admin/tokens`, {
      method: 'POST',
      headers: { Origin: 'https://elsewhere.test', 'Content-Type': 'application/x-www-form-urlencoded' },
      body: new URLSearchParams({ intent: 'create', userId: String(user.id), name: 'Foreign', expiresInDays: '30' }),
    })
    expect(foreign.status).toBe(403)

    const out = await go(jar, `${appUrl}/sign-out`, { method: 'POST', headers: { Origin: appUrl, 'Content-Type': 'application/x-www-form-urlencoded' }, body: '' })
    expect(out.status).toBe(302)
    expect((await go(jar, `${appUrl}/api/me`)).status).toBe(401)
  })
})
