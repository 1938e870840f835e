// npx tsx tests/bench/import.ts --db <file> [--rows 50000] [--port 3200]
// Imports a large inventory file through the built server (build/ must be current) on a copy of the
// database, twice, and reports for each commit: its wall time, how long the database's write lock was
// held (probed from a second connection that tries to take it every 20 ms), and the slowest /healthz
// answer while the commit ran (asked every 20 ms).
import Database from 'better-sqlite3'
import { spawn } from 'node:child_process'
import { copyFileSync, mkdtempSync, rmSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import { performance } from 'node:perf_hooks'
import { parseArgs } from 'node:util'
import { createDb } from '~/.server/db'
import { DEMO_DIRECTORY, startIdentityProvider } from '../../mocks/identity-provider'
import { inventoryFile } from '../setup/inventory-file'
import { TEST_CLIENT, TEST_SESSION_SECRET } from '../setup/server'
import { sessionCookieFor, userIdByEmail } from '../setup/sessions'
import { TEST_TODAY } from '../setup/temp-db'

const { values } = parseArgs({ options: { db: { type: 'string' }, rows: { type: 'string', default: '50000' }, port: { type: 'string', default: '3200' } } })
if (!values.db) throw new Error('--db <file> is required (e.g. a small or demo database)')
const sites = Math.max(1, Math.round(Number(values.rows) / 50))
const dir = mkdtempSync(join(tmpdir(), 'ductkeeper-import-bench-'))
const path = join(dir, 'bench.db')
copyFileSync(values.db, path)
const db = createDb(path)
const cookie = (await sessionCookieFor(db, userIdByEmail(db, 'office@ductkeeper.test'))).cookie
const model = (db.$client.prepare('select name from detector_models order by id limit 1').get() as { name: string }).name
const text = inventoryFile({ customer: 'Fernbrook Family Diners', model, sites, units: 10, perUnit: 5 })

const port = Number(values.port)
const url = `http://127.0.0.1:${port}`
const idp = await startIdentityProvider({ port: port + 1, clientId: TEST_CLIENT.id, clientSecret: TEST_CLIENT.secret, redirectUris: [`${url}/auth/callback`], accounts: DEMO_DIRECTORY })
const env = { ...process.env, NODE_ENV: 'production', DATABASE_PATH: path, PORT: String(port), HOST: '127.0.0.1', SESSION_SECRET: TEST_SESSION_SECRET, OFFICE_TODAY: TEST_TODAY, APP_URL: url, OIDC_ISSUER: idp.issuer, OIDC_CLIENT_ID: TEST_CLIENT.id, OIDC_CLIENT_SECRET: TEST_CLIENT.secret, DUCTKEEPER_JOBS: 'off' }
const server = spawn('node_modules/.bin/react-router-serve', ['build/server/index.js'], { env, stdio: ['ignore', 'inherit', 'inherit'] })
const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms))
for (let i = 0; ; i++) {
  if (await fetch(`${url}/healthz`).then((r) => r.ok, () => false)) break
  if (i > 600) throw new Error('the server did not start')
  await sleep(100)
}

// A second connection that only asks for the write lock and gives it back at once.
const probe = new Database(path)
probe.pragma('busy_timeout = 0')
const lockFree = () => {
  try {
    probe.exec('BEGIN IMMEDIATE; ROLLBACK')
    return true
  } catch {
    return false
  }
}

async function importOnce(label: string) {
  const headers = { Cookie: cookie, Origin: url }
  const form = new FormData()
  form.append('kind', 'inventory')
  form.append('source', 'Fernbrook')
  form.append('file', new Blob([text], { type: 'text/csv' }), 'fernbrook.csv')
  const up = (await (await fetch(`${url}/api/import`, { method: 'POST', headers, body: form })).json()) as { id: string; mapping: Record<string, string | null> }
  const post = (intent: string) => fetch(`${url}/api/import/${up.id}`, { method: 'POST', headers: { ...headers, 'Content-Type': 'application/json' }, body: JSON.stringify({ intent, mapping: up.mapping }) })
  await (await post('check')).text()

  let done = false
  let lockedMs = 0
  let slowestHealth = 0
  let healthAsks = 0
  const watch = (async () => {
    let last = performance.now()
    while (!done) {
      const now = performance.now()
      if (!lockFree()) lockedMs += now - last
      last = now
      await sleep(20)
    }
  })()
  const health = (async () => {
    while (!done) {
      const t = performance.now()
      await fetch(`${url}/healthz`).then((r) => r.text())
      slowestHealth = Math.max(slowestHealth, performance.now() - t)
      healthAsks++
      await sleep(20)
    }
  })()
  const t = performance.now()
  const res = await post('commit')
  const body = (await res.json()) as { report?: { counts: Record<string, number> }; error?: string }
  const wall = performance.now() - t
  done = true
  await Promise.all([watch, health])
  const s = (ms: number) => (ms / 1000).toFixed(2)
  console.log(`${label}: commit ${s(wall)} s, write lock held ~${s(lockedMs)} s, slowest /healthz ${s(slowestHealth)} s (${healthAsks} asked)`)
  console.log(`  ${JSON.stringify(body.report?.counts ?? body)}`)
}

try {
  console.log(`${text.split('\n').length - 2} rows, ${sites} sites`)
  await importOnce('first import')
  await importOnce('same file again')
} finally {
  probe.close()
  server.kill('SIGTERM')
  await new Promise((r) => server.once('exit', r))
  await idp.close()
  rmSync(dir, { recursive: true, force: true })
}
