// npx tsx tests/bench/day-turn.ts --db <file> [--plan candidates|fleet] [--days 1]
// First a plain start, then a start on a later office day than the stored facts were derived for, as
// after a night or a long weekend: /healthz is polled every 50 ms across each, the server's peak memory is read
// from /proc, and Triage's first page and counts are timed cold (first request) and warm. Works on a
// copy of the file; loopback only, bounded to 5 minutes.
import { copyFileSync, mkdtempSync, readFileSync, rmSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import { parseArgs } from 'node:util'
import { createDb } from '~/.server/db'
import { derivedDay, setDerivedDay } from '~/.server/derivation'
import { addDays } from '~/domain/dates'
import { startServer } from '#tests/setup/server'
import { sessionCookieFor, userIdByEmail } from '#tests/setup/sessions'

const { values } = parseArgs({ options: { db: { type: 'string' }, plan: { type: 'string', default: 'candidates' }, days: { type: 'string', default: '1' } } })
if (!values.db) throw new Error('--db <file> is required (e.g. a stress-scale database)')
const dir = mkdtempSync(join(tmpdir(), 'ductkeeper-bench-'))
const path = join(dir, 'bench.db')
copyFileSync(values.db, path)
const db = createDb(path)
const from = derivedDay(db) ?? '2026-06-15'
const to = addDays(from, Number(values.days))
setDerivedDay(db, from)

const pct = (xs: number[], p: number) => [...xs].sort((a, b) => a - b)[Math.min(xs.length - 1, Math.floor(p * xs.length))]
const kb = (pid: number, field: string) => Number(new RegExp(`${field}:\\s+(\\d+) kB`).exec(readFileSync(`/proc/${pid}/status`, 'utf8'))?.[1] ?? 0)
const summary = (xs: number[]) => `${xs.length} polls, p50 ${pct(xs, 0.5).toFixed(1)} ms, p99 ${pct(xs, 0.99).toFixed(1)} ms, max ${Math.max(...xs).toFixed(1)} ms`

/** Polls /healthz every 50 ms until `until` holds (or the deadline); returns each answer's time. */
async function poll(url: string, until: () => boolean, ms: number) {
  const polls: number[] = []
  const deadline = Date.now() + ms
  while (!until() && Date.now() < deadline) {
    const t = performance.now()
    await (await fetch(`${url}/healthz`)).arrayBuffer()
    polls.push(performance.now() - t)
    await new Promise((r) => setTimeout(r, 50))
  }
  return polls
}

// 1. A plain start on the day the facts were derived for: nothing to derive, the start alone.
{
  const t = performance.now()
  const server = await startServer(path, { OFFICE_TODAY: from, REFRESH_START_DELAY_MS: '0' })
  const ready = performance.now() - t
  try {
    const polls = await poll(server.url, () => false, 5_000)
    console.log(`start on ${from} (nothing to derive): answering after ${ready.toFixed(0)} ms; /healthz over the next 5 s: ${summary(polls)}`)
  } finally {
    await server.stop()
  }
}

// 2. The day turns: a start on a later office day, with /healthz polled from the first answer. With
// --plan fleet no derived day is kept, as on a first start, so the whole fleet is walked.
if (values.plan === 'fleet') db.$client.prepare("delete from app_state where key = 'derived-day'").run()
const server = await startServer(path, { OFFICE_TODAY: to, REFRESH_START_DELAY_MS: '1000' })
try {
  const idleRss = kb(server.pid, 'VmRSS')
  const polls = await poll(server.url, () => server.output().includes(`Stored facts derived for ${to}`), 300_000)
  const line = server.output().split('\n').find((l) => l.includes(`Stored facts derived for ${to}`))?.trim()
  console.log(`day turn ${from} → ${to}: ${line ?? 'did not finish in 5 minutes'}`)
  console.log(`/healthz during it: ${summary(polls)}`)
  console.log(`server memory: ${Math.round(idleRss / 1024)} MB before the refresh, peak ${Math.round(kb(server.pid, 'VmHWM') / 1024)} MB`)

  const session = await sessionCookieFor(db, userIdByEmail(db, 'lead@ductkeeper.test'))
  const time = async (p: string) => {
    const t = performance.now()
    const res = await fetch(server.url + p, { headers: { Cookie: session.cookie } })
    await res.arrayBuffer()
    if (res.status !== 200) throw new Error(`${p} → ${res.status}`)
    return performance.now() - t
  }
  for (const p of ['/triage', '/api/triage?limit=100', '/api/triage?reason=overdue&limit=100', '/api/triage?reason=failed-diagnosis&limit=100', '/api/events?q=rtu&limit=100']) {
    const cold = await time(p)
    const warm: number[] = []
    for (let i = 0; i < 20; i++) warm.push(await time(p))
    console.log(`${p}: cold ${cold.toFixed(1)} ms, warm p50 ${pct(warm, 0.5).toFixed(1)} ms, max ${Math.max(...warm).toFixed(1)} ms`)
  }
} finally {
  await server.stop()
  db.$client.close()
  rmSync(dir, { recursive: true, force: true })
}
