import { createHash } from 'node:crypto'
import { readdirSync, readFileSync, statSync } from 'node:fs'
import { join, resolve } from 'node:path'
import { pathToFileURL } from 'node:url'
import fc from 'fast-check'
import type { Db } from '~/.server/db'
import { DEMO_EMAIL } from './fixture'
import { sessionCookieFor, userIdByEmail } from './sessions'

/**
 * Hostile requests against every route of the production build: wrong types, huge strings, SQL and
 * HTML in text, unicode, NaN, negative and enormous numbers, deep JSON, wrong content types, oversize
 * bodies and uploads whose declared type lies. Each answer is held to three rules: never a 5xx, no
 * change to the database when the request is refused, and no input echoed unescaped into a page.
 */

interface BuiltRoute {
  id: string
  parentId?: string
  path?: string
  index?: boolean
  module: { loader?: unknown; action?: unknown; handle?: { sampleQuery?: string; sampleParams?: Record<string, string> } }
}

export interface FuzzRoute {
  id: string
  /** The path with `:name` placeholders, e.g. `/api/visits/:visitId`. */
  pattern: string
  index: boolean
  loader: boolean
  action: boolean
  sampleQuery: string
  sampleParams: Record<string, string>
}

/** Every route with a loader or an action, read from the built server (made from app/routes.ts). */
export async function builtRoutes(): Promise<FuzzRoute[]> {
  // Importing the build must not start the server's background jobs in the test process.
  process.env.DUCTKEEPER_JOBS = 'off'
  const build = (await import(pathToFileURL(resolve('build/server/index.js')).href)) as { routes: Record<string, BuiltRoute> }
  const out: FuzzRoute[] = []
  for (const r of Object.values(build.routes)) {
    if (r.id === 'root' || (!r.module.loader && !r.module.action)) continue
    const parts: string[] = []
    for (let p: BuiltRoute | undefined = r; p; p = p.parentId ? build.routes[p.parentId] : undefined) if (p.path) parts.unshift(p.path)
    out.push({
      id: r.id,
      pattern: `/${parts.join('/')}`.replace(/\/+/g, '/'),
      index: !!r.index,
      loader: !!r.module.loader,
      action: !!r.module.action,
      sampleQuery: r.module.handle?.sampleQuery ?? '',
      sampleParams: r.module.handle?.sampleParams ?? {},
    })
  }
  return out
}

function sourceFiles(dir: string): string[] {
  return readdirSync(dir).flatMap((name) => {
    const path = join(dir, name)
    if (statSync(path).isDirectory()) return sourceFiles(path)
    return /\.tsx?$/.test(name) && !name.includes('.test.') ? [path] : []
  })
}

/**
 * Field names and literal values the app's own schemas use, read from its source, so the fuzzer
 * reaches past "unknown field" into each schema's checks, and a new field is covered by itself.
 */
function appVocabulary() {
  const keys = new Set<string>(['intent', 'ids', 'filter', 'preview', 'previewId', 'versions', 'version', 'changeId', 'q', 'sort', 'dir', 'page', 'status'])
  const values = new Set<string>()
  for (const file of sourceFiles('app')) {
    const text = readFileSync(file, 'utf8')
    for (const m of text.matchAll(/\b([a-zA-Z_]\w{0,40})\s*:\s*(?:z\.|idParam|isoDate|optional|ids\b)/g)) keys.add(m[1])
    for (const m of text.matchAll(/z\.literal\(\s*'([^']{1,40})'\s*\)/g)) values.add(m[1])
    for (const m of text.matchAll(/z\.enum\(\s*\[([^\]]{1,2000})\]/g)) for (const v of m[1].matchAll(/'([^']{1,40})'/g)) values.add(v[1])
    for (const m of text.matchAll(/searchParams\.get\(\s*'([\w-]{1,40})'\s*\)/g)) keys.add(m[1])
  }
  return { keys: [...keys].sort(), values: [...values].sort() }
}

/** A tag that must never come back raw in an HTML answer. */
const MARK = '<i data-dkfuzz>'

const NASTY = [
  '', ' ', '0', '-0', '-1', '1.5', '1e309', '-1e309', 'NaN', 'Infinity', '0x10', '1_000', '9007199254740993',
  '99999999999999999999999999999999', '-2147483649', 'true', 'null', 'undefined', '[]', '{}', '[object Object]',
  "' OR '1'='1", "1; drop table detectors; --", "'); delete from visits; --", '" or ""="', '%', '_', '\\', '%00', '\u0000',
  `${MARK}<script>alert(1)</script>`, `"><img src=x onerror=alert(1)>${MARK}`, `</script>${MARK}`, 'javascript:alert(1)',
  '=cmd|"/c calc"!A1', '𝔡𝔲𝔠𝔱', 'e\u0301', '\u202eevil', '\ud800', '\uffff', 'ß'.repeat(300), '😀'.repeat(100), '\r\n\t',
  '2026-02-30', '0000-00-00', '1989-12-31', '2101-01-01', '2026-13-01', '26-1-1', '2026-01-01T00:00:00Z', '../../etc/passwd',
  '1,2,3', ',,', '1,-1', 'a'.repeat(70_000),
]

const numbers = fc.oneof(
  fc.integer(),
  fc.integer({ min: -3, max: 6 }),
  fc.double(),
  fc.constantFrom(Number.MAX_SAFE_INTEGER + 2, -1, 0, 2 ** 63, -(2 ** 63), 1e308, -1e-308, 0.5),
)

function arbitraries(vocab: ReturnType<typeof appVocabulary>) {
  const text = fc.oneof(
    { weight: 4, arbitrary: fc.constantFrom(...NASTY) },
    { weight: 3, arbitrary: fc.constantFrom(...vocab.values) },
    { weight: 2, arbitrary: fc.string({ unit: 'binary', maxLength: 40 }) },
    { weight: 1, arbitrary: fc.string({ maxLength: 20 }).map((s) => `${s}${MARK}`) },
    { weight: 1, arbitrary: fc.integer({ min: 1, max: 9 }).map(String) },
  )
  const key = fc.oneof({ weight: 6, arbitrary: fc.constantFrom(...vocab.keys) }, { weight: 1, arbitrary: fc.constantFrom('__proto__', 'constructor', '', 'a.b', '0') })
  const leaf = fc.oneof(text, numbers, fc.boolean(), fc.constant(null), fc.array(fc.integer({ min: -2, max: 8 }), { maxLength: 4 }))
  const value = fc.letrec<{ v: unknown }>((tie) => ({
    v: fc.oneof({ depthSize: 'small', withCrossShrink: true }, leaf, fc.array(tie('v'), { maxLength: 3 }), fc.dictionary(key, tie('v'), { maxKeys: 3 })),
  })).v
  const object = fc.dictionary(key, value, { minKeys: 0, maxKeys: 6 })
  const paramValue = fc.oneof(
    { weight: 3, arbitrary: fc.constantFrom('1', '2', '3') },
    { weight: 2, arbitrary: fc.constantFrom('0', '-1', '1.5', '1e3', 'NaN', '99999999999999999999', 'abc', '%00', '..', "1'or'1", `x${MARK}`, '𝔡', 'customers', 'detectors', 'events') },
    { weight: 1, arbitrary: fc.string({ maxLength: 12 }) },
  )
  // Node refuses a request head past 16 KB itself (431) before the app sees it, so huge text goes in bodies.
  const query = fc.dictionary(key, fc.oneof(text.filter((t) => t.length < 2000), numbers.map(String)), { maxKeys: 4 })
  return { text, value, object, paramValue, query }
}

type BodyKind = 'json' | 'form' | 'multipart' | 'upload' | 'raw-json' | 'wrong-type' | 'none' | 'oversize'

interface FuzzCase {
  route: FuzzRoute
  method: string
  params: Record<string, string>
  query: Record<string, unknown>
  body: { kind: BodyKind; object: Record<string, unknown>; raw: number }
  role: 'admin' | 'lead' | 'technician'
}

const RAW_JSON = ['{"ids":', '[1,2', '{"a":1}{"b":2}', '\uFEFF{}', '{"ids":[1,2,3], "ids":"x"}', '"just a string"', '12', 'null', 'true', '[]']
const deepJson = (n: number) => '['.repeat(n) + ']'.repeat(n)
const deepObject = (n: number) => '{"a":'.repeat(n) + '1' + '}'.repeat(n)

const UPLOADS: { bytes: Uint8Array; type: string; name: string }[] = [
  { bytes: new TextEncoder().encode('<html><script>alert(1)</script></html>'), type: 'image/png', name: 'photo.png' },
  { bytes: new TextEncoder().encode('<svg xmlns="http://www.w3.org/2000/svg" onload="alert(1)"/>'), type: 'image/jpeg', name: 'photo.jpg' },
  { bytes: new Uint8Array([0x4d, 0x5a, 0x90, 0x00, 3, 0, 0, 0]), type: 'application/pdf', name: 'report.pdf' },
  { bytes: new TextEncoder().encode('GIF89a truncated'), type: 'image/png', name: `${MARK}.png` },
  { bytes: new Uint8Array([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a, 0, 0, 0, 0]), type: 'image/png', name: 'broken.png' },
  { bytes: new TextEncoder().encode('name,serial\n=cmd,1\n'), type: 'text/csv', name: 'detectors.csv' },
  { bytes: new Uint8Array(0), type: 'image/png', name: 'empty.png' },
]

function caseArbitrary(route: FuzzRoute, a: ReturnType<typeof arbitraries>): fc.Arbitrary<FuzzCase> {
  {
    const names = [...route.pattern.matchAll(/:(\w+)/g)].map((m) => m[1])
    const methods = [...(route.loader ? ['GET', 'GET', 'HEAD'] : []), ...(route.action ? ['POST', 'POST', 'POST', 'PATCH', 'PUT', 'DELETE'] : [])]
    return fc.record({
      route: fc.constant(route),
      method: fc.constantFrom(...methods),
      params: fc.tuple(...names.map((n) => (route.sampleParams[n] ? fc.oneof(fc.constant(route.sampleParams[n]), a.paramValue) : a.paramValue))).map((vs) => Object.fromEntries(names.map((n, i) => [n, vs[i]]))),
      query: a.query,
      body: fc.record({
        kind: fc.constantFrom<BodyKind>('json', 'json', 'json', 'form', 'form', 'multipart', 'upload', 'raw-json', 'wrong-type', 'none', 'oversize'),
        object: a.object,
        raw: fc.nat(),
      }),
      role: fc.constantFrom<FuzzCase['role']>('admin', 'admin', 'lead', 'technician'),
    })
  }
}

/** `perRoute` cases for every route (so none is left out by chance), in a fixed order for one seed. */
export function casesFor(routes: FuzzRoute[], perRoute: number, seed: number): FuzzCase[] {
  const a = arbitraries(appVocabulary())
  return routes.flatMap((route, i) => fc.sample(caseArbitrary(route, a), { numRuns: perRoute, seed: seed + i }))
}

const flat = (v: unknown): string => (typeof v === 'string' ? v : JSON.stringify(v) ?? 'undefined')

function buildRequest(c: FuzzCase, base: string, cookie: string): { url: string; init: RequestInit } {
  const path = c.route.pattern.replace(/:(\w+)/g, (_, n: string) => encodeURIComponent(c.params[n]))
  const qs = new URLSearchParams(c.route.sampleQuery)
  if (c.route.index) qs.set('index', '')
  for (const [k, v] of Object.entries(c.query)) qs.append(k, flat(v))
  const url = `${base}${path}${qs.size ? `?${qs}` : ''}`
  const headers: Record<string, string> = { Cookie: cookie, Origin: new URL(base).origin, Accept: path.startsWith('/api/') ? 'application/json' : 'text/html' }
  if (c.method === 'GET' || c.method === 'HEAD') return { url, init: { method: c.method, headers } }
  let body: BodyInit | undefined
  const { kind, object, raw } = c.body
  switch (kind) {
    case 'json':
      headers['Content-Type'] = 'application/json'
      body = JSON.stringify(object)
      break
    case 'raw-json':
      headers['Content-Type'] = raw % 5 === 0 ? 'application/json; charset=utf-16' : 'application/json'
      body = raw % 3 === 0 ? (raw % 2 ? deepJson(50_000 + (raw % 1000)) : deepObject(20_000)) : raw % 7 === 0 ? new Uint8Array([0x7b, 0xff, 0xfe, 0x7d]) : RAW_JSON[raw % RAW_JSON.length]
      break
    case 'form':
      headers['Content-Type'] = 'application/x-www-form-urlencoded'
      body = new URLSearchParams(Object.entries(object).map(([k, v]) => [k, flat(v)])).toString()
      break
    case 'multipart':
    case 'upload': {
      const form = new FormData()
      for (const [k, v] of Object.entries(object)) form.append(k, flat(v))
      if (kind === 'upload') {
        const u = UPLOADS[raw % UPLOADS.length]
        form.append(['file', 'file', 'upload', 'photo'][raw % 4], new Blob([u.bytes as Uint8Array<ArrayBuffer>], { type: u.type }), u.name)
      }
      body = form
      break
    }
    case 'wrong-type':
      headers['Content-Type'] = ['text/plain', 'application/xml', 'image/png', 'application/json-patch', 'multipart/form-data'][raw % 5]
      body = JSON.stringify(object)
      break
    case 'oversize':
      headers['Content-Type'] = raw % 2 ? 'application/json' : 'application/x-www-form-urlencoded'
      body = raw % 2 ? JSON.stringify({ ids: [1], note: 'x'.repeat(1_200_000) }) : `note=${'y'.repeat(1_200_000)}`
      break
    case 'none':
      break
  }
  return { url, init: { method: c.method, headers, body } }
}

/**
 * A checksum of every table's rows, leaving out sessions (each test request brings its own) and the
 * audit entries of refused sign-ins (written on purpose when a sign-in is refused, with their count).
 */
function tablesChecksum(db: Db): string {
  const q = db.$client
  const tables = q
    .prepare("select name from sqlite_master where type = 'table' and name not like 'sqlite_%' and name not like 'search_index_%' and name <> 'sessions' order by name")
    .pluck()
    .all() as string[]
  const hash = createHash('sha256')
  for (const t of tables) {
    // The audit log's kept row total moves with those entries too.
    const where = t === 'audit_log' ? " where action <> 'session.refused'" : t === 'table_counts' ? " where name <> 'audit_log'" : ''
    hash.update(`${t}\n`)
    for (const row of q.prepare(`select * from "${t}"${where}`).raw().iterate()) hash.update(JSON.stringify(row, (_, v: unknown) => (typeof v === 'bigint' ? v.toString() : Buffer.isBuffer(v) ? v.toString('hex') : v)))
  }
  return hash.digest('hex')
}

interface Finding {
  route: string
  method: string
  status: number
  rule: '5xx' | 'db-change' | 'reflected' | 'no-answer'
  url: string
  body: string
  answer: string
}

/** Runs the cases one after another against the server; returns what broke the rules, first of each kind per route. */
export async function runCases(cases: FuzzCase[], o: { url: string; db: Db; timeoutMs?: number }) {
  const { db } = o
  const adminId = userIdByEmail(db, DEMO_EMAIL.admin)
  const ids = { admin: adminId, lead: userIdByEmail(db, DEMO_EMAIL.lead), technician: userIdByEmail(db, DEMO_EMAIL.technician) }
  const version = () => db.$client.pragma('data_version', { simple: true }) as number
  let baseline = tablesChecksum(db)
  const findings = new Map<string, Finding>()
  const statuses = new Map<number, number>()
  for (const c of cases) {
    // The fuzzer may demote or deactivate a demo user through the users page: put them back (a
    // change this test makes, so the checksum is taken again).
    const users = db.$client.prepare("select count(*) from users where email in (?, ?, ?) and active = 1 and role in ('admin', 'lead', 'technician')").pluck().get(DEMO_EMAIL.admin, DEMO_EMAIL.lead, DEMO_EMAIL.technician) as number
    if (users < 3) {
      db.$client.prepare("update users set active = 1, role = case email when ? then 'admin' when ? then 'lead' else 'technician' end where email in (?, ?, ?)").run(DEMO_EMAIL.admin, DEMO_EMAIL.lead, DEMO_EMAIL.admin, DEMO_EMAIL.lead, DEMO_EMAIL.technician)
      baseline = tablesChecksum(db)
    }
    const { cookie } = await sessionCookieFor(db, ids[c.role])
    let { url, init } = buildRequest(c, o.url, cookie)
    const before = version()
    let status = 0
    let answer = ''
    let contentType = ''
    // The server closes a connection whose body it refused unread; a pooled socket it closed fails
    // the next request before anything is sent, so that one is sent again on a new connection, as a
    // browser would. A server that died fails both.
    for (let attempt = 0; attempt < 2 && status === 0; attempt++) {
      try {
        const res = await fetch(url, { ...init, redirect: 'manual', signal: AbortSignal.timeout(o.timeoutMs ?? 20_000) })
        status = res.status
        contentType = res.headers.get('Content-Type') ?? ''
        answer = await res.text()
      } catch (error) {
        answer = `${String(error)} ${String((error as Error).cause ?? '')}`
        ;({ url, init } = buildRequest(c, o.url, cookie))
      }
    }
    statuses.set(status, (statuses.get(status) ?? 0) + 1)
    const report = (rule: Finding['rule']) => {
      const k = `${c.route.id} ${c.method} ${rule}`
      if (!findings.has(k)) {
        const body = init.body === undefined ? '' : typeof init.body === 'string' ? init.body.slice(0, 300) : `<${c.body.kind}>`
        findings.set(k, { route: c.route.id, method: c.method, status, rule, url: url.slice(0, 300), body, answer: answer.slice(0, 400) })
      }
    }
    if (status === 0) report('no-answer')
    if (status >= 500) report('5xx')
    if (version() !== before) {
      const now = tablesChecksum(db)
      if (status >= 400 && now !== baseline) report('db-change')
      baseline = now
    }
    if (!/json/.test(contentType) && answer.includes(MARK)) report('reflected')
  }
  return { findings: [...findings.values()], statuses: Object.fromEntries(statuses) }
}

export function describeFindings(findings: Finding[]): string {
  return findings.map((f) => `${f.rule} ${f.status} ${f.method} ${f.route}\n  ${f.url}\n  body: ${f.body}\n  answer: ${f.answer}`).join('\n')
}
