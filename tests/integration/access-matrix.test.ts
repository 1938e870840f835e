import { pathToFileURL } from 'node:url'
import { resolve } from 'node:path'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { allows, ROLE_KEYS, type Access, type Role, type RouteAccess } from '~/domain/permissions'
import { DEMO_EMAIL } from '#tests/setup/fixture'
import { startServer } from '#tests/setup/server'
import sharp from 'sharp'
import { sessionCookieFor, userIdByEmail } from '#tests/setup/sessions'
import { seededDb } from '#tests/setup/temp-db'

interface BuiltRoute {
  id: string
  parentId?: string
  path?: string
  index?: boolean
  module: { default?: unknown; loader?: unknown; action?: unknown; handle?: { access?: RouteAccess; sampleQuery?: string; sampleParams?: Record<string, string>; redirects?: boolean; methods?: readonly string[] } }
}

// Every route comes from the production build, which is made from app/routes.ts: a new route
// joins this matrix without anyone adding it here.
// Importing the build must not start the server's background jobs in this test process.
process.env.DUCTKEEPER_JOBS = 'off'
const build = (await import(pathToFileURL(resolve('build/server/index.js')).href)) as { routes: Record<string, BuiltRoute> }
const routes = Object.values(build.routes).filter((r) => r.id !== 'root')

function fullPath(route: BuiltRoute): string {
  const parts: string[] = []
  for (let r: BuiltRoute | undefined = route; r; r = r.parentId ? build.routes[r.parentId] : undefined) {
    if (r.path) parts.unshift(r.path)
  }
  // Any :param gets the id of the first seeded row, unless the route names a value (a list's name).
  const query = [route.index ? 'index' : '', route.module.handle?.sampleQuery ?? ''].filter(Boolean).join('&')
  return `/${parts.join('/')}`.replace(/:([A-Za-z]+)/g, (_, name: string) => route.module.handle?.sampleParams?.[name] ?? '1').replace(/\/+/g, '/') + (query ? `?${query}` : '')
}

describe('route × role matrix', () => {
  let server: Awaited<ReturnType<typeof startServer>>
  let data: ReturnType<typeof seededDb>

  beforeAll(async () => {
    data = seededDb('small')
    server = await startServer(data.path)
    // The seed holds no photos: one real upload gives the attachment routes their row 1.
    const png = await sharp({ create: { width: 8, height: 8, channels: 3, background: '#2a6' } }).png().toBuffer()
    const form = new FormData()
    form.append('file', new Blob([new Uint8Array(png)], { type: 'image/png' }), 'matrix.png')
    const admin = (await sessionCookieFor(data.db, userIdByEmail(data.db, DEMO_EMAIL.admin))).cookie
    const upload = await fetch(`${server.url}/api/visits/1/attachments`, { method: 'POST', headers: { Cookie: admin, Origin: server.url }, body: form })
    expect(upload.status, await upload.clone().text()).toBe(201)
  })
  afterAll(async () => {
    await server?.stop()
    data?.cleanup()
  })

  it('finds the routes and every loader and action declares its access', () => {
    expect(routes.length).toBeGreaterThanOrEqual(8)
    for (const r of routes) {
      if (r.module.loader) expect(r.module.handle?.access?.loader, `${r.id} loader`).toBeTruthy()
      if (r.module.action) expect(r.module.handle?.access?.action, `${r.id} action`).toBeTruthy()
    }
  })

  async function check(route: BuiltRoute, method: 'GET' | 'POST', access: Access, role: Role | null) {
    const path = fullPath(route)
    // A fresh session per request: probing POST /sign-out revokes the one it was sent with.
    const cookie = role ? (await sessionCookieFor(data.db, userIdByEmail(data.db, DEMO_EMAIL[role]))).cookie : ''
    const isApi = path.startsWith('/api/')
    const res = await fetch(server.url + path, {
      method,
      redirect: 'manual',
      headers: {
        Cookie: cookie,
        Accept: isApi ? 'application/json' : 'text/html',
        ...(method === 'POST' ? { Origin: server.url, 'Content-Type': 'application/x-www-form-urlencoded' } : {}),
      },
      body: method === 'POST' ? 'intent=matrix-probe' : undefined,
    })
    const location = res.headers.get('location') ?? ''
    const label = `${route.id}: ${method} ${path} as ${role ?? 'nobody'} → ${res.status} ${location}`
    if (allows(role, access)) {
      expect([401, 403], label).not.toContain(res.status)
      expect(location.startsWith('/sign-in?returnTo='), label).toBe(false)
      // A route that declares the methods it serves answers any other with 405 and says which it takes.
      const methods = route.module.handle?.methods
      if (methods && !methods.includes(method)) {
        expect(res.status, label).toBe(405)
        expect(res.headers.get('allow'), label).toBe(methods.join(', '))
      } else if (method === 'GET' && access !== 'public') expect(res.status, label).toBe(route.module.handle?.redirects ? 302 : 200)
    } else if (role === null) {
      if (isApi) expect(res.status, label).toBe(401)
      else {
        expect(res.status, label).toBe(302)
        expect(location, label).toMatch(/^\/sign-in\?returnTo=/)
      }
    } else {
      expect(res.status, label).toBe(403)
    }
    await res.body?.cancel()
  }

  it('answers every route for nobody and for each role as the permission table says', async () => {
    let checked = 0
    for (const route of routes) {
      // A pathless layout has no URL of its own: its loader runs, and is checked, under every child.
      if (!route.path && !route.index) {
        expect(routes.some((r) => r.parentId === route.id), route.id).toBe(true)
        continue
      }
      const access = route.module.handle?.access ?? {}
      for (const role of [null, ...ROLE_KEYS]) {
        if (route.module.loader && access.loader) await check(route, 'GET', access.loader, role)
        if (route.module.action && access.action) await check(route, 'POST', access.action, role)
        checked++
      }
    }
    expect(checked).toBeGreaterThan(30)
  })

  it('refuses cookie-borne writes from another origin on every action', async () => {
    for (const route of routes.filter((r) => r.module.action)) {
      const variants: Array<Record<string, string>> = [{ Origin: 'http://evil.test' }, { 'Sec-Fetch-Site': 'cross-site', Origin: 'http://evil.test' }, {}]
      for (const headers of variants) {
        const res = await fetch(server.url + fullPath(route), {
          method: 'POST',
          redirect: 'manual',
          headers: { ...headers, Cookie: (await sessionCookieFor(data.db, userIdByEmail(data.db, DEMO_EMAIL.admin))).cookie, 'Content-Type': 'application/x-www-form-urlencoded' },
          body: 'intent=matrix-probe',
        })
        // With a foreign Origin header React Router itself refuses first (400); with none, Ductkeeper does (403).
        expect([400, 403], `${route.id} ${JSON.stringify(headers)}`).toContain(res.status)
        await res.body?.cancel()
      }
    }
  })
})
