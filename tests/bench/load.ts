// npm run load -- [--db <file>] [--seconds 20] [--connections 50] [--rate <requests per second, all connections>]
// A bounded load run on loopback: autocannon drives the list APIs while a bulk reschedule (preview,
// apply, undo) and a visit's notice, start and completion run through the same server, and /healthz
// is timed throughout. Fails (exit 1) on any error or non-2xx answer, any SQLITE_BUSY in the
// server's output, or /healthz at or over 50 ms p99. Runs on a copy: the given file is never written.
import { spawn } from 'node:child_process'
import { copyFileSync, mkdtempSync, rmSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import { parseArgs } from 'node:util'
import autocannon from 'autocannon'
import { createDb } from '~/.server/db'
import { createToken } from '~/.server/repos/tokens'
import { startServer } from '#tests/setup/server'
import { seededDb } from '#tests/setup/temp-db'

const { values } = parseArgs({
  options: { db: { type: 'string' }, seconds: { type: 'string', default: '20' }, connections: { type: 'string', default: '50' }, rate: { type: 'string' } },
})
const seconds = Math.min(60, Math.max(3, Number(values.seconds)))
const connections = Math.min(100, Math.max(1, Number(values.connections)))
// Without a rate every connection sends its next request as soon as the last is answered (the most
// the process can serve); with one, the run is an office's steady traffic and /healthz shows the wait.
const rate = values.rate ? Math.min(5_000, Math.max(1, Number(values.rate))) : undefined

const dir = mkdtempSync(join(tmpdir(), 'ductkeeper-load-'))
const path = join(dir, 'load.db')
if (values.db) copyFileSync(values.db, path)
else {
  const demo = seededDb('demo')
  copyFileSync(demo.path, path)
  demo.cleanup()
}

// Tokens, the day the file was derived for, and the work to run, read before the server starts.
const db = createDb(path)
const q = db.$client
const derivedDay = (q.prepare("select value from app_state where key = 'derived-day'").get() as { value: string } | undefined)?.value
const userId = (email: string) => (q.prepare('select id from users where email = ?').get(email) as { id: number }).id
const expiresAt = new Date(Date.now() + 3_600_000)
const token = (email: string) => createToken(db, { userId: userId(email), name: 'load run', expiresAt, actorId: null }).token
const lead = token('lead@ductkeeper.test')
const office = token('office@ductkeeper.test')
const visit = q
  .prepare(
    `select v.id, v.technician_id as tech, u.email from visits v join users u on u.id = v.technician_id
      where v.status = 'planned' and exists (select 1 from visit_detectors vd where vd.visit_id = v.id) order by v.scheduled_on, v.id limit 1`,
  )
  .get() as { id: number; tech: number; email: string } | undefined
const technician = visit ? token(visit.email) : null
const detectorIds = visit ? (q.prepare('select detector_id as id from visit_detectors where visit_id = ?').all(visit.id) as Array<{ id: number }>).map((r) => r.id) : []
const someSite = (q.prepare('select min(id) as id from sites').get() as { id: number }).id
q.close()

const server = await startServer(path, derivedDay ? { OFFICE_TODAY: derivedDay } : {})
// Bounded: a run that has not finished well after its length stops, saying where it stood.
setTimeout(() => {
  console.error(`FAILED: the run did not finish in ${seconds + 90} s. Steps done: ${steps.map((x) => `${x.name} ${x.status}`).join(', ') || 'none'}`)
  console.error(server.output().split('\n').slice(-40).join('\n'))
  process.exit(1)
}, (seconds + 90) * 1000).unref()
const auth = (t: string) => ({ authorization: `Bearer ${t}`, 'content-type': 'application/json' })

// The list reads the console makes most: first pages, sorts, filters, a text search and a deep page.
const reads = [
  '/api/devices?limit=100',
  '/api/devices?limit=100&sort=nextDueOn&dir=asc',
  '/api/devices?limit=100&environment=humid',
  '/api/devices?limit=100&offset=5000',
  '/api/events?limit=100',
  '/api/events?limit=100&q=rtu',
  '/api/visits?limit=100',
  '/api/sites?limit=100',
  '/api/customers?limit=100',
  '/api/triage?limit=100',
  `/api/sites/${someSite}`,
  '/api/search?q=ro',
]

// Each read once before the clock starts: a process's first request of a kind compiles its code and
// reads its pages from disk (a start is timed on its own by tests/bench/day-turn.ts).
for (const path of reads) await (await fetch(server.url + path, { headers: { authorization: `Bearer ${lead}` } })).arrayBuffer()

// /healthz every 50 ms for the whole run, from a process of its own: in this one the probe's times
// took in the load generator's own work (starting 50 autocannon instances, adding up their results),
// up to 100 ms at the run's first second and last, with the server idle. The probe warms up (a
// process's first fetches load and compile its HTTP client) and says so before the run starts. Each
// probe is noted with when it was sent, from the start of the run.
const PROBE = `
  const [url, origin] = process.argv.slice(1)
  const out = []
  let on = true
  process.stdin.on('data', () => { on = false })
  ;(async () => {
    for (let i = 0; i < 20; i++) await (await fetch(url)).arrayBuffer()
    process.stderr.write('probe ready\\n')
    while (on) {
      const t = performance.now()
      const res = await fetch(url)
      await res.arrayBuffer()
      out.push([performance.now() - t, performance.timeOrigin + t - Number(origin)])
      await new Promise((r) => setTimeout(r, 50))
    }
    process.stdout.write(JSON.stringify(out))
  })()
`
const clock = performance.now()
const prober = spawn(process.execPath, ['-e', PROBE, `${server.url}/healthz`, String(performance.timeOrigin + clock)], { stdio: ['pipe', 'pipe', 'pipe'] })
let probed = ''
prober.stdout.on('data', (d) => (probed += d))
await new Promise<void>((resolve, reject) => {
  prober.stderr.on('data', (d) => (String(d).includes('probe ready') ? resolve() : process.stderr.write(d)))
  prober.once('exit', () => reject(new Error('the /healthz probe stopped before it was ready')))
})
const health: number[] = []
const sentAt: number[] = []
/** Stops the probe and takes its times. */
async function stopProbe() {
  const done = new Promise((r) => prober.once('exit', r))
  prober.stdin.end('stop')
  await done
  for (const [ms, at] of JSON.parse(probed || '[]') as Array<[number, number]>) {
    health.push(ms)
    sentAt.push(at)
  }
}

interface Step {
  name: string
  status: number
  ms: number
  /** When it was sent, from the start of the run. */
  at: number
  error?: string
}
const steps: Step[] = []
async function call(name: string, method: string, url: string, t: string, body?: unknown) {
  const start = performance.now()
  const res = await fetch(server.url + url, { method, headers: auth(t), body: body === undefined ? undefined : JSON.stringify(body) })
  const json = (await res.json().catch(() => null)) as Record<string, unknown> | null
  steps.push({ name, status: res.status, ms: performance.now() - start, at: start - clock, error: res.ok ? undefined : JSON.stringify(json).slice(0, 300) })
  return json
}

// The writes, started a few seconds into the load so they meet it at full speed.
const writes = (async () => {
  await new Promise((r) => setTimeout(r, 3_000))
  const filter = 'status=planned'
  const preview = await call('bulk reschedule: preview', 'POST', '/api/bulk/reschedule', office, { preview: true, filter, mode: 'shift', days: 2 })
  if (preview?.previewId) {
    const applied = await call('bulk reschedule: apply', 'POST', '/api/bulk/reschedule', office, { preview: false, previewId: preview.previewId, filter, mode: 'shift', days: 2 })
    if (applied?.changeId) await call('bulk reschedule: undo', 'POST', '/api/bulk/undo', office, { changeId: applied.changeId })
  }
  if (!visit || !technician) return
  const version = async () => ((await call('visit: read', 'GET', `/api/visits/${visit.id}`, technician)) as { visit: { version: number } }).visit.version
  const now = Date.now()
  await call('visit: notice', 'POST', `/api/visits/${visit.id}`, technician, {
    intent: 'notify',
    version: await version(),
    method: 'phone',
    spokeWith: 'Operator on the load run',
    inTestFrom: new Date(now).toISOString(),
    inTestUntil: new Date(now + 4 * 3_600_000).toISOString(),
    siteManagementTold: true,
  })
  await call('visit: start', 'POST', `/api/visits/${visit.id}`, technician, { intent: 'start', version: await version() })
  await call('visit: complete', 'POST', `/api/visits/${visit.id}`, technician, {
    intent: 'complete',
    version: await version(),
    entries: detectorIds.map((detectorId) => ({ detectorId, result: 'pass' })),
  })
})()

let next = 0
const request = { method: 'GET' as const, headers: { authorization: `Bearer ${lead}` }, setupRequest: (req: { path?: string }) => ({ ...req, path: reads[next++ % reads.length] }) }

/** One autocannon run, each answer's time noted as it comes. */
function cannon(opts: autocannon.Options, latencies: number[]): Promise<autocannon.Result> {
  return new Promise((resolve, reject) => {
    const instance = autocannon(opts, (error, result) => (error ? reject(error) : resolve(result)))
    instance.on('response', (_client, _status, _bytes, ms) => latencies.push(ms))
  })
}

interface Totals {
  total: number
  errors: number
  timeouts: number
  non2xx: number
  latencies: number[]
}

/**
 * At a rate, one autocannon instance per connection, each at its share of the rate, started evenly
 * spaced over one second. autocannon's own rate limit sends each second's quota back to back on every
 * connection at once (one burst a second, the whole rate queued at the same instant); people do not
 * click in step, so the instances are staggered to spread the same rate over the second.
 */
async function paced(perSecond: number): Promise<Totals> {
  const n = Math.min(connections, perSecond)
  const latencies: number[] = []
  const runs = Array.from({ length: n }, async (_, i) => {
    await new Promise((r) => setTimeout(r, Math.round((i * 1000) / n)))
    return cannon({ url: server.url, connections: 1, duration: seconds, connectionRate: Math.max(1, Math.round(perSecond / n)), requests: [request] }, latencies)
  })
  const results = await Promise.all(runs)
  return {
    total: results.reduce((t, r) => t + r.requests.total, 0),
    errors: results.reduce((t, r) => t + r.errors, 0),
    timeouts: results.reduce((t, r) => t + r.timeouts, 0),
    non2xx: results.reduce((t, r) => t + r.non2xx, 0),
    latencies,
  }
}

/** Without a rate: every connection sends its next request as soon as the last is answered. */
async function flat(): Promise<Totals> {
  const latencies: number[] = []
  const r = await cannon({ url: server.url, connections, duration: seconds, requests: [request] }, latencies)
  return { total: r.requests.total, errors: r.errors, timeouts: r.timeouts, non2xx: r.non2xx, latencies }
}

const result = rate ? await paced(rate) : await flat()
await writes
await stopProbe()
await server.stop()
rmSync(dir, { recursive: true, force: true })

const pct = (xs: number[], p: number) => {
  const s = [...xs].sort((a, b) => a - b)
  return s[Math.min(s.length - 1, Math.floor(p * s.length))] ?? NaN
}
const busy = (server.output().match(/SQLITE_BUSY/g) ?? []).length
console.log(`\nLoad: ${connections} connections${rate ? ` at ${rate} requests/s` : ', as fast as answered,'} for ${seconds} s over ${reads.length} list reads (${values.db ? 'given file' : 'demo scale'})`)
console.log(`  requests ${result.total}, ${(result.total / seconds).toFixed(1)}/s; errors ${result.errors}, timeouts ${result.timeouts}, non-2xx ${result.non2xx}`)
console.log(`  latency p50 ${pct(result.latencies, 0.5).toFixed(1)} ms, p99 ${pct(result.latencies, 0.99).toFixed(1)} ms, max ${Math.max(...result.latencies).toFixed(1)} ms`)
console.log(`  /healthz: ${health.length} probes, p50 ${pct(health, 0.5).toFixed(1)} ms, p99 ${pct(health, 0.99).toFixed(1)} ms, max ${Math.max(...health).toFixed(1)} ms`)
// The slowest probes, each with the write under way when it was sent (if any), to tell what they waited behind.
const during = (at: number) => steps.find((s) => at >= s.at && at <= s.at + s.ms)?.name ?? 'reads only'
const slowest = health.map((ms, i) => ({ ms, at: sentAt[i] })).sort((a, b) => b.ms - a.ms).slice(0, 5)
console.log(`  slowest /healthz: ${slowest.map((p) => `${p.ms.toFixed(0)} ms at ${(p.at / 1000).toFixed(1)} s (${during(p.at)})`).join('; ')}`)
for (const s of steps) console.log(`  ${s.name}: ${s.status} in ${s.ms.toFixed(0)} ms at ${(s.at / 1000).toFixed(1)} s${s.error ? ` ${s.error}` : ''}`)
console.log(`  SQLITE_BUSY in the server's output: ${busy}`)

const failed = [
  result.errors > 0 && `${result.errors} errors`,
  result.non2xx > 0 && `${result.non2xx} non-2xx answers`,
  busy > 0 && 'SQLITE_BUSY reached the log',
  pct(health, 0.99) >= 50 && '/healthz p99 at or over 50 ms',
  steps.some((s) => s.status >= 300) && 'a write was refused',
].filter(Boolean)
if (failed.length) {
  console.error(`FAILED: ${failed.join('; ')}`)
  process.exit(1)
}
console.log('PASSED')
