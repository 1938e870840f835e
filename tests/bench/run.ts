// npm run bench [-- --db file] [--requests 15] [--budget 300] [--skip api,work,browser] [--only text] [--build dir] [--port 3710] [--idp-port 4110]
// One run at fleet scale: a stress-scale database (seeded once and reused while the generator's
// source is unchanged), the built server on loopback, and each request timed beside its floor: the
// SQL its loader runs, replayed straight through better-sqlite3 on the same file, interleaved with
// the HTTP requests. Then fleet-wide work in process, and the console in headless Chromium.
// Prints a table and writes tests/bench/results.json. Bounded in requests and time; loopback only.
import { spawn } from 'node:child_process'
import { createHash } from 'node:crypto'
import { copyFileSync, existsSync, mkdirSync, mkdtempSync, readdirSync, readFileSync, renameSync, rmSync, writeFileSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { dirname, join, resolve } from 'node:path'
import { parseArgs } from 'node:util'
import { setFlagsFromString } from 'node:v8'
import { runInNewContext } from 'node:vm'
import { createDb } from '~/.server/db'
import { derivedDay } from '~/.server/derivation'
import { seedFreshDatabase } from '~/.server/seed/fresh'
import { DEMO_DIRECTORY, startIdentityProvider } from '../../mocks/identity-provider'
import { TEST_CLIENT, TEST_SESSION_SECRET } from '#tests/setup/server'
import { sessionCookieFor, userIdByEmail } from '#tests/setup/sessions'
import { TEST_TODAY } from '#tests/setup/temp-db'
import { benchBrowser } from './browser'
import { Floor } from './floor'
import { listCases, type ListCase } from './list-cases'
import { benchWork } from './work'

const { values } = parseArgs({
  options: {
    db: { type: 'string' },
    requests: { type: 'string', default: '15' },
    budget: { type: 'string', default: '300' },
    skip: { type: 'string', default: '' },
    only: { type: 'string' },
    port: { type: 'string', default: '3710' },
    'idp-port': { type: 'string' },
    // A copy of the build keeps the run steady while the tree is rebuilt: a folder named build, beside
    // links to node_modules and drizzle (the server reads build/client and drizzle/ from where it runs).
    build: { type: 'string', default: 'build' },
  },
})
const perCase = Math.min(50, Math.max(3, Number(values.requests) || 15))
// The collector, to start each timed sample on a collected young heap (see `settle`).
setFlagsFromString('--expose-gc')
const collect = runInNewContext('gc') as (o?: { type: 'minor' | 'major' }) => void
const budgetMs = Math.min(900, Math.max(30, Number(values.budget) || 300)) * 1000
const skip = new Set(values.skip!.split(',').filter(Boolean))
const port = Number(values.port)
const idpPort = Number(values['idp-port'] ?? port + 400) // by default the extra-server range beside the app's

export interface Result {
  name: string
  p50Ms: number
  p95Ms: number
  floorP50Ms: number | null
  ratio: number | null
}
const results: Result[] = []
const pct = (xs: number[], p: number) => [...xs].sort((a, b) => a - b)[Math.min(xs.length - 1, Math.floor(p * xs.length))]
function record(name: string, ms: number[], floor: number[] | null) {
  const p50 = pct(ms, 0.5)
  const f50 = floor?.length ? pct(floor, 0.5) : null
  const round = (n: number) => Math.round(n * 100) / 100
  results.push({ name, p50Ms: round(p50), p95Ms: round(pct(ms, 0.95)), floorP50Ms: f50 === null ? null : round(f50), ratio: f50 ? round(p50 / f50) : null })
}

/** The stress-scale database, seeded once per version of the generator's source. */
function stressDb(): string {
  const dir = 'app/.server/seed'
  const hash = createHash('sha256')
  for (const f of readdirSync(dir).sort()) hash.update(f).update(readFileSync(join(dir, f)))
  const cache = join('tests/.db', `bench-stress-${hash.digest('hex').slice(0, 16)}.db`)
  if (!existsSync(cache)) {
    mkdirSync('tests/.db', { recursive: true })
    console.log(`Seeding a stress-scale database into ${cache} (a minute or two, once)…`)
    const seeded = seedFreshDatabase(`${cache}.part`, 'stress', TEST_TODAY)
    if (!seeded.seeded) throw new Error('stress seed did not run')
    renameSync(`${cache}.part`, cache)
  }
  return cache
}

const source = values.db ?? stressDb()
const dir = mkdtempSync(join(tmpdir(), 'ductkeeper-bench-'))
const path = join(dir, 'bench.db')
copyFileSync(source, path)
// Migrated here, before the server opens it, so no request waits on a migration.
createDb(path).$client.close()
const today = (() => {
  const db = createDb(path, { runMigrations: false })
  const day = derivedDay(db) ?? TEST_TODAY
  db.$client.close()
  return day
})()
process.env.SESSION_SECRET = TEST_SESSION_SECRET
process.env.OFFICE_TODAY = today
process.env.DUCTKEEPER_JOBS = 'off'

const url = `http://127.0.0.1:${port}`
const idp = await startIdentityProvider({ port: idpPort, clientId: TEST_CLIENT.id, clientSecret: TEST_CLIENT.secret, redirectUris: [`${url}/auth/callback`], accounts: DEMO_DIRECTORY })
// The derived facts stay as seeded (no daily refresh writing while the timings run).
// Run beside the build: the server finds its client files at build/client under its working folder.
const buildDir = resolve(values.build!)
const server = spawn(resolve('node_modules/.bin/react-router-serve'), [join(buildDir, 'server/index.js')], {
  cwd: dirname(buildDir),
  env: {
    ...process.env,
    NODE_ENV: 'production',
    DATABASE_PATH: path,
    PORT: String(port),
    HOST: '127.0.0.1',
    APP_URL: url,
    OIDC_ISSUER: idp.issuer,
    OIDC_CLIENT_ID: TEST_CLIENT.id,
    OIDC_CLIENT_SECRET: TEST_CLIENT.secret,
  },
  stdio: ['ignore', 'ignore', 'pipe'],
})
let serverErr = ''
server.stderr.on('data', (d) => (serverErr = (serverErr + d).slice(-4000)))

const started = Date.now()
const skipped: string[] = []
try {
  for (const deadline = Date.now() + 30_000; ; ) {
    if (server.exitCode !== null) throw new Error(`server exited: ${serverErr}`)
    if (await fetch(`${url}/healthz`).then((r) => r.ok).catch(() => false)) break
    if (Date.now() > deadline) throw new Error(`server did not answer /healthz in 30 s: ${serverErr}`)
    await new Promise((r) => setTimeout(r, 200))
  }
  const floor = new Floor(path)
  const session = await sessionCookieFor(floor.db, userIdByEmail(floor.db, 'office@ductkeeper.test'))
  const headers = { Cookie: session.cookie, Accept: 'application/json' }
  const get = async (p: string) => {
    const res = await fetch(url + p, { headers })
    const body = (await res.json()) as { total?: number }
    if (res.status !== 200) throw new Error(`${p} → ${res.status} ${JSON.stringify(body).slice(0, 300)}`)
    return body
  }

  /**
   * Each sample starts with this process's young heap collected and a short rest: a collection of
   * the client's own (its floor replays allocate whole result sets) landing inside a timed request
   * showed as the server's latency, 30–60 ms on answers the server logged at 5.
   */
  const settle = async () => {
    collect({ type: 'minor' })
    await new Promise((r) => setTimeout(r, 2))
  }

  // HTTP floor: the server's own cost of answering anything.
  const healthz: number[] = []
  for (let i = 0; i < perCase * 4; i++) {
    await settle()
    const t = performance.now()
    await (await fetch(`${url}/healthz`)).arrayBuffer()
    healthz.push(performance.now() - t)
  }
  record('api /healthz (the HTTP floor)', healthz.slice(perCase), null)

  /** Times a request `perCase` times over HTTP, each followed by its floor. */
  async function measure(name: string, p: string) {
    if (Date.now() - started > budgetMs) return skipped.push(name), null
    // Captured in process (the first call fills kept totals and statements, as the server's does).
    const captured = await floor.capture(p, session.cookie).catch((e: unknown) => {
      console.warn(`no floor for ${name}: ${String(e).split('\n')[0].slice(0, 160)}`)
      return null
    })
    const body = await get(p) // the server's first request: fills its own kept totals
    const ms: number[] = []
    const fl: number[] = []
    for (let i = 0; i < perCase; i++) {
      await settle()
      const t = performance.now()
      await get(p)
      ms.push(performance.now() - t)
      if (captured) {
        collect({ type: 'minor' })
        fl.push(floor.replay(captured.ran))
      }
    }
    record(name, ms, captured ? fl : null)
    return body
  }
  const { lists, records, searches } = listCases(floor.db.$client)
  const keep = (c: ListCase) => !skip.has('api') && (!values.only || c.name.includes(values.only))
  for (const c of [...lists, ...searches].filter(keep)) {
    const first = await measure(c.name, c.path).catch((e: unknown) => (console.warn(`${c.name}: ${String(e).slice(0, 200)}`), null))
    const limit = 100
    if (first?.total && first.total > limit) await measure(`${c.name} · last page`, `${c.path}&offset=${first.total - limit}`).catch((e: unknown) => console.warn(String(e).slice(0, 200)))
  }
  for (const c of records.filter(keep)) await measure(`api ${c.name}`, c.path).catch((e: unknown) => console.warn(String(e).slice(0, 200)))

  // Each part reports what it measured even if a later one fails.
  if (!skip.has('work')) {
    try {
      for (const w of await benchWork(path, join(dir, 'work.db'), today, { visits: 10_000, cycleDetectors: 5_000, runs: 3 })) {
        record(w.name, w.ms, w.floor ?? null)
        if (w.note) console.log(`${w.name}: ${w.note}`)
      }
    } catch (e) {
      console.error('fleet-wide work failed:', e)
    }
  }
  if (!skip.has('browser')) {
    try {
      for (const b of await benchBrowser(url, session.cookie)) record(b.name, b.ms, null)
    } catch (e) {
      console.error('browser part failed:', e)
    }
  }
} finally {
  server.kill('SIGTERM')
  await new Promise((r) => (server.exitCode !== null ? r(null) : server.once('exit', r)))
  await idp.close()
  rmSync(dir, { recursive: true, force: true })
}

const f = (n: number | null) => (n === null ? '—' : n.toFixed(1)).padStart(8)
console.log(`\n${source} · office day ${today} · ${perCase} requests a case · ms`)
console.log(`${'case'.padEnd(64)} ${'p50'.padStart(8)} ${'p95'.padStart(8)} ${'floor'.padStart(8)} ${'ratio'.padStart(8)}`)
for (const r of results) console.log(`${r.name.slice(0, 64).padEnd(64)} ${f(r.p50Ms)} ${f(r.p95Ms)} ${f(r.floorP50Ms)} ${f(r.ratio)}`)
const lists = results.filter((r) => r.name.startsWith('api ') && !r.name.includes('healthz') && !r.name.startsWith('api record'))
const over = lists.filter((r) => r.p95Ms > 25)
console.log(`\n${lists.length} list requests; ${over.length} with p95 over 25 ms${over.length ? `: ${over.map((r) => r.name).join('; ')}` : ''}`)
if (skipped.length) console.log(`skipped (time budget): ${skipped.length} cases`)
writeFileSync('tests/bench/results.json', `${JSON.stringify(results, null, 2)}\n`)
console.log(`${results.length} results in tests/bench/results.json · ${((Date.now() - started) / 1000).toFixed(0)} s`)
