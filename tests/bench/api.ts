// npx tsx tests/bench/api.ts [--db path] [--requests 10]
// Times the list, record and search routes through the built server over loopback. Bounded: at most
// 200 requests per route and 60 s in all. With --db it runs against that file (it only reads, apart
// from the one session row it adds and removes); without, against a freshly seeded small database.
import { parseArgs } from 'node:util'
import { createDb, type Db } from '~/.server/db'
import { officeToday } from '~/.server/today'
import { startServer } from '#tests/setup/server'
import { sessionCookieFor, userIdByEmail } from '#tests/setup/sessions'
import { seededDb } from '#tests/setup/temp-db'

const { values } = parseArgs({ options: { db: { type: 'string' }, requests: { type: 'string', default: '10' } } })
const perCase = Math.min(50, Math.max(3, Number(values.requests) || 10))
const PER_ROUTE = 200
const BUDGET_MS = 60_000

const seeded = values.db ? null : seededDb('small')
const dbPath = values.db ?? seeded!.path
const db: Db = seeded?.db ?? createDb(dbPath, { runMigrations: false })
const one = <T>(sql: string, ...params: unknown[]) => db.$client.prepare(sql).get(...params) as T

// A given database is judged on today's office day (the test server otherwise pins the seed's), and
// the daily refresh of derived fields stays off: it would write to that file and skew the timings.
const server = await startServer(dbPath, { DUCTKEEPER_JOBS: 'off', ...(seeded ? {} : { OFFICE_TODAY: officeToday() }) })
const session = await sessionCookieFor(db, userIdByEmail(db, 'office@ductkeeper.test'))
const started = Date.now()
const used = new Map<string, number>()

interface Row {
  name: string
  n: number
  first: number
  p50: number
  p95: number
  total: number | string
}
const results: Row[] = []
const skipped: string[] = []

const pct = (sorted: number[], p: number) => sorted[Math.min(sorted.length - 1, Math.floor(p * sorted.length))]
/** The route a path belongs to, for the per-route request cap: `/api/sites/12` → `/api/sites/:id`. */
const routeOf = (path: string) => path.split('?')[0].replace(/\/\d+$/, '/:id')

async function fetchJson(path: string) {
  const res = await fetch(server.url + path, { headers: { Cookie: session.cookie, Accept: 'application/json' } })
  const body = (await res.json()) as { total?: number; rows?: unknown[]; error?: string }
  if (res.status !== 200) throw new Error(`${path} → ${res.status} ${JSON.stringify(body)}`)
  return body
}

async function time(name: string, path: string) {
  const route = routeOf(path)
  const n = Math.min(perCase, PER_ROUTE - (used.get(route) ?? 0))
  if (n <= 0 || Date.now() - started > BUDGET_MS) {
    skipped.push(name)
    return null
  }
  used.set(route, (used.get(route) ?? 0) + n)
  const ms: number[] = []
  let body: Awaited<ReturnType<typeof fetchJson>> = {}
  for (let i = 0; i < n; i++) {
    const t = performance.now()
    body = await fetchJson(path)
    ms.push(performance.now() - t)
  }
  // The first request pays for the filtered total; later ones find it kept for 30 s.
  const sorted = [...ms].sort((a, b) => a - b)
  results.push({ name, n, first: ms[0], p50: pct(sorted, 0.5), p95: pct(sorted, 0.95), total: body.total ?? '' })
  return body
}

/** First page and a page near the end, of a list as it stands and with a filter. */
async function list(path: string, filter: string) {
  for (const [label, query] of [
    ['', ''],
    [` ${filter}`, filter],
  ] as const) {
    const base = `${path}?${query}${query ? '&' : ''}limit=100`
    const first = await time(`${path}${label} first page`, base)
    if (first?.total) await time(`${path}${label} deep page`, `${base}&offset=${Math.max(0, first.total - 100)}`)
  }
}

try {
  // Records to open: the largest customer, its busiest site, and what hangs off that site.
  const customer = one<{ id: number }>('select customer_id as id from sites group by customer_id order by count(*) desc limit 1').id
  const site = one<{ id: number }>(
    'select s.id from sites s where s.customer_id = ? order by (select count(*) from detectors d where d.site_id = s.id) desc limit 1',
    customer,
  ).id
  const unit = one<{ id: number }>('select id from units where site_id = ? order by id limit 1', site).id
  const detector = one<{ id: number }>('select id from detectors where site_id = ? order by id limit 1', site).id
  const visit = one<{ id: number }>('select visit_id as id from visit_detectors group by visit_id order by count(*) desc limit 1').id
  const street = one<{ street: string }>('select street from sites where id = ?', site).street

  await list('/api/devices', 'due=overdue')
  await list('/api/customers', 'kind=restaurant')
  await list('/api/sites', 'codeBasis=imc')
  await list('/api/units', 'kind=ahu')
  await list('/api/events', 'kind=trouble')
  await list('/api/visits', 'status=done')

  for (const sort of ['tag', 'site', 'customer', 'unit', 'position', 'state', 'due', 'nextDueOn', 'environment', 'housing', 'delay', 'loop', 'risk', 'lastFunctionalOn', 'installedOn']) {
    await time(`/api/devices sort=${sort}`, `/api/devices?sort=${sort}&limit=100`)
  }
  // Across all events only occurredAt is offered; the other sorts within one site.
  await time('/api/events sort=occurredAt asc', '/api/events?sort=occurredAt&dir=asc&limit=100')
  for (const sort of ['occurredAt', 'kind', 'detail', 'detector', 'site', 'by']) {
    await time(`/api/events site=${site} sort=${sort}`, `/api/events?site=${site}&sort=${sort}&limit=100`)
  }
  await time(`/api/events customer=${customer}`, `/api/events?customer=${customer}&limit=100`)
  await time('/api/events q=<street>', `/api/events?q=${encodeURIComponent(street)}&limit=100`)
  await time('/api/events q=rtu (matches most detectors)', '/api/events?q=rtu&limit=100')

  // Sorts by a correlated count, over the whole table.
  await time('/api/customers sort=overdue desc', '/api/customers?sort=overdue&dir=desc&limit=100')
  await time('/api/customers sort=detectors desc', '/api/customers?sort=detectors&dir=desc&limit=100')
  await time('/api/sites sort=overdue desc', '/api/sites?sort=overdue&dir=desc&limit=100')
  await time('/api/sites sort=detectors desc', '/api/sites?sort=detectors&dir=desc&limit=100')
  await time('/api/sites sort=nextVisitOn', '/api/sites?sort=nextVisitOn&dir=desc&limit=100')
  await time('/api/units sort=detectors desc', '/api/units?sort=detectors&dir=desc&limit=100')
  await time('/api/visits sort=detectors desc', '/api/visits?sort=detectors&dir=desc&limit=100')

  await time(`/api/customers/${customer}`, `/api/customers/${customer}`)
  await time(`/api/sites/${site}`, `/api/sites/${site}`)
  await time(`/api/units/${unit}`, `/api/units/${unit}`)
  await time(`/api/devices/${detector}`, `/api/devices/${detector}`)
  await time(`/api/visits/${visit}`, `/api/visits/${visit}`)

  for (const q of ['rtu', 'harbor lan', street.split(' ').slice(0, 2).join(' ').slice(0, -1)]) {
    await time(`/api/search q=${q}`, `/api/search?q=${encodeURIComponent(q)}`)
  }

  const floor = await time('/healthz (server floor)', '/healthz')
  void floor
} finally {
  await server.stop()
  db.$client.prepare('delete from sessions where id = ?').run(session.id)
  if (seeded) seeded.cleanup()
  else db.$client.close()
}

const f = (ms: number) => ms.toFixed(1).padStart(7)
console.log(`${values.db ?? 'seeded small database'} · ${perCase} requests a case · ms over loopback`)
console.log(`${'case'.padEnd(52)} ${'n'.padStart(3)} ${'first'.padStart(7)} ${'p50'.padStart(7)} ${'p95'.padStart(7)}  total`)
for (const r of results) console.log(`${r.name.padEnd(52)} ${String(r.n).padStart(3)} ${f(r.first)} ${f(r.p50)} ${f(r.p95)}  ${r.total}`)
if (skipped.length) console.log(`skipped (request cap or time budget): ${skipped.join(', ')}`)
console.log(`${results.reduce((a, r) => a + r.n, 0)} requests in ${((Date.now() - started) / 1000).toFixed(1)} s`)
