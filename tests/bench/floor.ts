// The floor of a request: the SQL its loader runs, straight through better-sqlite3 on the same file.
// The loader is called once in this process against a handle whose statements are recorded; the
// statements it ran (less the session check) are then replayed alone, with the same parameters.
import type Database from 'better-sqlite3'
import { createDb, type Db } from '~/.server/db'

interface Ran {
  sql: string
  raw: boolean
  method: 'all' | 'get' | 'iterate'
  args: unknown[]
}

type Loader = (args: { request: Request; params: Record<string, string>; context: unknown }) => Promise<unknown>

const routeModule = (m: Promise<unknown>) => m as Promise<{ loader: Loader }>

const ROUTES: Array<{ pattern: RegExp; module: () => Promise<{ loader: Loader }>; param?: string }> = [
  { pattern: /^\/api\/devices$/, module: () => routeModule(import('~/routes/api.devices')) },
  { pattern: /^\/api\/devices\/(\d+)$/, module: () => routeModule(import('~/routes/api.devices.$deviceId')), param: 'deviceId' },
  { pattern: /^\/api\/customers$/, module: () => routeModule(import('~/routes/api.customers')) },
  { pattern: /^\/api\/customers\/(\d+)$/, module: () => routeModule(import('~/routes/api.customers.$customerId')), param: 'customerId' },
  { pattern: /^\/api\/sites$/, module: () => routeModule(import('~/routes/api.sites')) },
  { pattern: /^\/api\/sites\/(\d+)$/, module: () => routeModule(import('~/routes/api.sites.$siteId')), param: 'siteId' },
  { pattern: /^\/api\/units$/, module: () => routeModule(import('~/routes/api.units')) },
  { pattern: /^\/api\/units\/(\d+)$/, module: () => routeModule(import('~/routes/api.units.$unitId')), param: 'unitId' },
  { pattern: /^\/api\/visits$/, module: () => routeModule(import('~/routes/api.visits')) },
  { pattern: /^\/api\/visits\/(\d+)$/, module: () => routeModule(import('~/routes/api.visits.$visitId')), param: 'visitId' },
  { pattern: /^\/api\/events$/, module: () => routeModule(import('~/routes/api.events')) },
  { pattern: /^\/api\/triage$/, module: () => routeModule(import('~/routes/api.triage')) },
  { pattern: /^\/api\/search$/, module: () => routeModule(import('~/routes/api.search')) },
]

// Statements of the session check and its bookkeeping: not part of a list's own work.
const SESSION = /\b(sessions|api_tokens)\b/

export class Floor {
  readonly db: Db
  private recording: Ran[] | null = null
  private prepared = new Map<string, Database.Statement>()
  private prepareUnrecorded: (source: string) => Database.Statement

  constructor(path: string) {
    this.db = createDb(path, { runMigrations: false })
    const client = this.db.$client
    const prepare = client.prepare.bind(client)
    this.prepareUnrecorded = prepare
    // Records each statement run while `recording` is set, whichever way drizzle runs it.
    client.prepare = ((source: string) => {
      const stmt = prepare(source)
      const wrap = (s: Database.Statement, raw: boolean): Database.Statement =>
        new Proxy(s, {
          get: (target, key, receiver) => {
            if (key === 'raw') return (on?: boolean) => wrap(target.raw(on !== false), on !== false)
            if (key === 'all' || key === 'get' || key === 'iterate') {
              return (...args: unknown[]) => {
                if (this.recording && !SESSION.test(source)) this.recording.push({ sql: source, raw, method: key, args })
                return (target[key] as (...a: unknown[]) => unknown)(...args)
              }
            }
            const v = Reflect.get(target, key, receiver)
            return typeof v === 'function' ? v.bind(target) : v
          },
        })
      return wrap(stmt, false)
    }) as typeof client.prepare
    // The route modules read the process-wide handle: this one.
    ;(globalThis as { __ductkeeperDb?: Db }).__ductkeeperDb = this.db
  }

  /** Calls the route's loader in this process and returns the statements it read with. */
  async capture(path: string, cookie: string): Promise<{ ran: Ran[]; body: { total?: number } }> {
    const url = new URL(path, 'http://127.0.0.1')
    const route = ROUTES.find((r) => r.pattern.test(url.pathname))
    if (!route) throw new Error(`no route for ${path}`)
    const { loader } = await route.module()
    const m = route.pattern.exec(url.pathname)!
    const params = route.param ? { [route.param]: m[1] } : {}
    const call = async () => {
      const res = (await loader({ request: new Request(url, { headers: { Cookie: cookie } }), params, context: {} })) as Response
      if (res.status !== 200) throw new Error(`${path} → ${res.status} ${await res.text()}`)
      return (await res.json()) as { total?: number }
    }
    await call() // the first call fills kept totals and statements, as the server's first request does
    this.recording = []
    try {
      const body = await call()
      return { ran: this.recording, body }
    } finally {
      this.recording = null
    }
  }

  /** Runs recorded statements as the loader did, without the route, the ORM or HTTP; returns ms. */
  replay(ran: Ran[]): number {
    const t = performance.now()
    for (const r of ran) {
      let stmt = this.prepared.get(r.sql)
      if (!stmt) this.prepared.set(r.sql, (stmt = this.prepareUnrecorded(r.sql)))
      const s = r.raw ? stmt.raw(true) : stmt.raw(false)
      if (r.method === 'iterate') for (const _ of s.iterate(...r.args)) void _
      else s[r.method](...r.args)
    }
    return performance.now() - t
  }
}
