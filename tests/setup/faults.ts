import { parse } from 'csv-parse/sync'
import { stringify } from 'csv-stringify/sync'
import { expect } from 'vitest'
import { createDb, type Db } from '~/.server/db'
import { checkDatabase } from '~/.server/db-check'
import { calendarFor } from '~/domain/calendar'
import { addDays } from '~/domain/dates'
import { makeVisits } from './bulk'
import { DEMO_EMAIL } from './fixture'
import { startServer } from './server'
import { sessionCookieFor, userIdByEmail } from './sessions'
import { seededDb, TEST_TODAY } from './temp-db'

/**
 * A write interrupted by SIGKILL of the built server: the change is sent, the process is killed
 * `killAfterMs` later (or left to finish when null), the server is started again on the same file,
 * and the database is checked. Each scenario says whether its change is wholly there or wholly absent.
 */
export interface Scenario {
  name: string
  /** Sets the records up on the server; returns what to send and how to judge the file afterwards. */
  prepare(ctx: { db: Db; url: string; cookie: string }): Promise<{ send(): Promise<Response>; state(db: Db): 'before' | 'after' | 'partial' }>
}

const json = (url: string, cookie: string, body: unknown) =>
  fetch(url, { method: 'POST', headers: { Cookie: cookie, Origin: new URL(url).origin, 'Content-Type': 'application/json' }, body: JSON.stringify(body) })

/** `n` planned visits moved two working days by one bulk change. */
export const bulkReschedule = (n: number): Scenario => ({
  name: `bulk reschedule of ${n} visits`,
  async prepare({ db, url, cookie }) {
    const site = db.$client.prepare('select id, region from sites order by id limit 1').get() as { id: number; region: string }
    const day = calendarFor(site.region).nextWorkingDay(addDays(TEST_TODAY, 10))
    const ids = makeVisits(db, { n, siteId: site.id, date: day, technicianId: null })
    const preview = await json(`${url}/api/bulk/reschedule`, cookie, { preview: true, ids, mode: 'shift', days: 2 })
    expect(preview.status, await preview.clone().text()).toBe(200)
    const { previewId } = (await preview.json()) as { previewId: string }
    const changes = () => db.$client.prepare('select count(*) from bulk_changes').pluck().get() as number
    const before = changes()
    return {
      send: () => json(`${url}/api/bulk/reschedule`, cookie, { preview: false, previewId, ids, mode: 'shift', days: 2 }),
      state(after) {
        const dates = after.$client.prepare(`select scheduled_on, count(*) as n from visits where id in (${ids.join(',')}) group by scheduled_on`).all() as Array<{ scheduled_on: string; n: number }>
        const made = (after.$client.prepare('select count(*) from bulk_changes').pluck().get() as number) - before
        if (dates.length === 1 && dates[0].scheduled_on === day && made === 0) return 'before'
        if (dates.length === 1 && dates[0].scheduled_on !== day && made === 1) return 'after'
        return 'partial'
      },
    }
  },
})

/** The fleet's inventory exported and imported back under new customer names and serials: every row a new record. */
export const csvImport: Scenario = {
  name: 'CSV import',
  async prepare({ db, url, cookie }) {
    const exported = await (await fetch(`${url}/api/export/detectors?sort=tag`, { headers: { Cookie: cookie } })).text()
    const rows = (parse(exported, { columns: true }) as Array<Record<string, string>>).map((r) => ({ ...r, customer: `Alderbrook ${r.customer}`, serial: r.serial ? `AB-${r.serial}` : '' }))
    const customers = new Set(rows.map((r) => r.customer)).size
    const form = new FormData()
    form.append('kind', 'inventory')
    form.append('source', 'Fault drill')
    form.append('file', new Blob([stringify(rows, { header: true })], { type: 'text/csv' }), 'fleet.csv')
    const up = await fetch(`${url}/api/import`, { method: 'POST', headers: { Cookie: cookie, Origin: url }, body: form })
    expect(up.status, await up.clone().text()).toBe(201)
    const { id, mapping } = (await up.json()) as { id: string; mapping: Record<string, string | null> }
    // The check says how many detectors the commit adds (its streamed lines end with the report).
    const checked = await (await json(`${url}/api/import/${id}`, cookie, { intent: 'check', mapping })).text()
    const report = JSON.parse(checked.trim().split('\n').at(-1)!) as { report: { counts: { detectorsAdded: number } } }
    const adds = report.report.counts.detectorsAdded
    expect(adds).toBe(rows.length)
    const detectors = () => db.$client.prepare('select count(*) from detectors').pluck().get() as number
    const before = detectors()
    return {
      send: () => json(`${url}/api/import/${id}`, cookie, { intent: 'commit', mapping }),
      state(after) {
        const n = after.$client.prepare('select count(*) from detectors').pluck().get() as number
        const made = after.$client.prepare("select count(*) from customers where name like 'Alderbrook %'").pluck().get() as number
        if (n === before && made === 0) return 'before'
        if (n === before + adds && made === customers) return 'after'
        return 'partial'
      },
    }
  },
}

/** A started visit over many detectors, completed into their history with one request. */
export const visitCompletion: Scenario = {
  name: 'visit completion',
  async prepare({ db, url }) {
    const q = db.$client
    const tech = (await sessionCookieFor(db, userIdByEmail(db, DEMO_EMAIL.technician))).cookie
    const site = q.prepare('select site_id as id from detectors group by site_id order by count(*) desc limit 1').get() as { id: number }
    const [visitId] = makeVisits(db, { n: 1, siteId: site.id, date: TEST_TODAY, technicianId: userIdByEmail(db, DEMO_EMAIL.technician), detectors: 1 })
    // Every detector of the site on this one visit, which is under way (notice logged, started).
    q.prepare('delete from visit_detectors where visit_id = ?').run(visitId)
    const detectors = q.prepare('select id from detectors where site_id = ? order by id').pluck().all(site.id) as number[]
    const item = q.prepare("insert into visit_detectors (visit_id, detector_id, tasks) values (?, ?, 'visual,functional')")
    for (const d of detectors) item.run(visitId, d)
    q.prepare("update visits set status = 'in-progress', started_at = ? where id = ?").run(`${TEST_TODAY}T13:00:00.000Z`, visitId)
    const version = q.prepare('select version from visits where id = ?').pluck().get(visitId) as number
    const entries = detectors.map((detectorId) => ({ detectorId, result: 'pass' }))
    return {
      send: () => json(`${url}/api/visits/${visitId}`, tech, { intent: 'complete', version, entries }),
      state(after) {
        const status = after.$client.prepare('select status from visits where id = ?').pluck().get(visitId) as string
        const results = after.$client.prepare('select count(*) from task_results where visit_id = ?').pluck().get(visitId) as number
        if (status === 'in-progress' && results === 0) return 'before'
        if (status === 'done' && results === detectors.length * 2) return 'after'
        return 'partial'
      },
    }
  },
}

/**
 * Runs one scenario on a fresh copy of the small database: kills the server `killAfterMs` after the
 * change is sent (null: lets it finish and reports how long it took), starts it again, and checks.
 */
export async function killDuring(scenario: Scenario, killAfterMs: number | null) {
  const data = seededDb('small')
  try {
    let server = await startServer(data.path, { DUCTKEEPER_JOBS: 'off' })
    const cookie = (await sessionCookieFor(data.db, userIdByEmail(data.db, DEMO_EMAIL.lead))).cookie
    const { send, state } = await scenario.prepare({ db: data.db, url: server.url, cookie })
    const started = performance.now()
    const answer = send().then(
      (res) => ({ status: res.status, ms: performance.now() - started }),
      () => ({ status: 0, ms: performance.now() - started }),
    )
    let killed = false
    if (killAfterMs !== null) {
      await new Promise((r) => setTimeout(r, killAfterMs))
      killed = process.kill(server.pid, 'SIGKILL')
    }
    const sent = await answer
    await server.stop()
    // The test's own handle is closed first: a fresh one opens the file as a restarted process would.
    data.db.$client.close()
    server = await startServer(data.path, { DUCTKEEPER_JOBS: 'off' })
    const health = await fetch(`${server.url}/healthz`)
    await server.stop()
    const db = createDb(data.path)
    try {
      const result = { killed, answered: sent.status, ms: sent.ms, health: health.status, state: state(db), disagreements: checkDatabase(db, TEST_TODAY).disagreements }
      return result
    } finally {
      db.$client.close()
    }
  } finally {
    data.cleanup()
  }
}
