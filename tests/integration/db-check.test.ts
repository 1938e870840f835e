import { spawnSync } from 'node:child_process'
import { afterAll, describe, expect, it } from 'vitest'
import { checkDatabase } from '~/.server/db-check'
import { rederive } from '~/.server/derivation'
import { seededDb, TEST_TODAY } from '#tests/setup/temp-db'

describe('database check', () => {
  const small = seededDb('small')
  const demo = seededDb('demo')
  afterAll(() => {
    small.cleanup()
    demo.cleanup()
  })

  it('finds no disagreement in the seeded small and demo databases', () => {
    for (const s of [small, demo]) {
      const { detectors, disagreements } = checkDatabase(s.db, TEST_TODAY, { integrity: 'quick' })
      expect(detectors).toBeGreaterThan(100)
      expect(disagreements).toEqual([])
    }
  })

  it('keeps every record in step with its history: the latest passed functional test is the record date', () => {
    const q = demo.db.$client
    const off = q
      .prepare(
        `select count(*) as n from detectors d
         where d.last_functional_on is not (select max(done_on) from task_results r where r.detector_id = d.id and r.task = 'functional')
            or d.last_cleaned_on is not (select max(done_on) from task_results r where r.detector_id = d.id and r.task = 'cleaning')`,
      )
      .get() as { n: number }
    expect(off.n).toBe(0)
    // A site's notice count and its timeline's notices come from the same rows.
    const notices = q
      .prepare(
        `select count(*) as n from sites s
         left join (select site_id, count(*) as c from notifications group by site_id) n on n.site_id = s.id
         left join (select site_id, count(*) as c from events where kind = 'notice' group by site_id) e on e.site_id = s.id
         where coalesce(n.c, 0) != coalesce(e.c, 0)`,
      )
      .get() as { n: number }
    expect(notices.n).toBe(0)
  })

  it('ranks every detector whose recorded wiring is a fault with the wiring-fault reason', () => {
    const q = demo.db.$client
    const faulty = q.prepare("select count(*) as n from detectors where alarm_terminal = 'NC' or eol_placement = 'across-pair'").get() as { n: number }
    expect(faulty.n).toBeGreaterThan(0)
    const missing = q
      .prepare(
        `select count(*) as n from detectors where (alarm_terminal = 'NC' or eol_placement = 'across-pair')
           and (loop_verdict != 'fail' or risk_reasons not like '%,failed-diagnosis,%')`,
      )
      .get() as { n: number }
    expect(missing.n).toBe(0)
  })

  it('reports a record date, a stored score and a kept total that disagree, and rederive mends the record', () => {
    const q = small.db.$client
    const id = (q.prepare("select id from detectors where last_functional_on is not null order by id limit 1").get() as { id: number }).id
    q.prepare("update detectors set last_functional_on = '2001-01-01', risk_score = risk_score + 7 where id = ?").run(id)
    q.prepare("update table_counts set rows = rows + 1 where name = 'events'").run()
    const { disagreements } = checkDatabase(small.db, TEST_TODAY, { integrity: 'none' })
    const checks = disagreements.map((d) => d.check)
    expect(checks).toContain('history')
    expect(checks).toContain('derived')
    expect(checks).toContain('row-total')
    expect(disagreements.find((d) => d.check === 'history')?.message).toContain(`detector ${id}: lastFunctionalOn is "2001-01-01"`)

    expect(rederive(small.db, [id], TEST_TODAY)).toBe(1)
    q.prepare("update table_counts set rows = rows - 1 where name = 'events'").run()
    expect(checkDatabase(small.db, TEST_TODAY, { integrity: 'none' }).disagreements).toEqual([])
  })

  it('runs as npm run db:check, ending with its count line and a non-zero exit on any disagreement', () => {
    const run = () =>
      spawnSync('node_modules/.bin/tsx', ['scripts/db-check.ts', '--today', TEST_TODAY, '--quick', '--db', small.path], { encoding: 'utf8' })
    const clean = run()
    expect(clean.status).toBe(0)
    expect(clean.stdout.trim().split('\n').at(-1)).toBe('200 detectors checked, 0 disagreements')
    small.db.$client.prepare("update detectors set due_status = 'ok' where due_status = 'overdue' and id = (select min(id) from detectors where due_status = 'overdue')").run()
    const dirty = run()
    expect(dirty.status).toBe(1)
    expect(dirty.stdout).toMatch(/derived: detector \d+: dueStatus is "ok", the derivation for 2026-06-15 gives "overdue"/)
    expect(dirty.stdout.trim().split('\n').at(-1)).toBe('200 detectors checked, 1 disagreements')
  })
})

describe('open triage counts', () => {
  const s = seededDb('small')
  afterAll(() => s.cleanup())

  it('stay equal to count(*) through acknowledging, a changed record and a new detector', () => {
    const q = s.db.$client
    const kept = () => Object.fromEntries((q.prepare('select code, n from reason_counts').all() as Array<{ code: string; n: number }>).map((r) => [r.code, r.n]))
    const counted = (code: string) =>
      (q.prepare(`select count(*) as n from detectors where risk_reasons != '' and acknowledged_at is null and (? = 'open' or risk_reasons like '%,' || ? || ',%')`).get(code, code) as { n: number }).n
    const agree = () => {
      for (const [code, n] of Object.entries(kept())) expect([code, n]).toEqual([code, counted(code)])
    }
    agree()
    expect(kept().open).toBeGreaterThan(0)
    q.prepare("update detectors set acknowledged_at = '2026-06-15T10:00:00.000Z' where id in (select id from detectors where risk_reasons != '' limit 5)").run()
    agree()
    q.prepare("update detectors set risk_reasons = ',overdue,' where id in (select id from detectors where risk_reasons = '' limit 3)").run()
    q.prepare("update detectors set acknowledged_at = null where acknowledged_at is not null").run()
    agree()
  })
})
