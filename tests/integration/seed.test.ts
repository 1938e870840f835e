import { afterAll, describe, expect, it } from 'vitest'
import { SCALES } from '~/.server/seed/generate'
import { seededDb } from '#tests/setup/temp-db'

const snapshot = (q: ReturnType<typeof seededDb>['db']['$client']) => ({
  counts: q.prepare('select name, rows from table_counts order by name').all(),
  firstSites: q.prepare('select * from sites order by id limit 3').all(),
  firstDetectors: q.prepare('select * from detectors order by id limit 5').all(),
  firstEvents: q.prepare('select * from events order by id limit 5').all(),
  lastDetector: q.prepare('select * from detectors order by id desc limit 1').get(),
})

describe('seed', () => {
  const made: Array<() => void> = []
  afterAll(() => made.forEach((c) => c()))

  it('small is deterministic and respects foreign keys', () => {
    const a = seededDb('small')
    const b = seededDb('small', { fresh: true })
    made.push(a.cleanup, b.cleanup)
    expect(snapshot(a.db.$client)).toEqual(snapshot(b.db.$client))
    expect(a.db.$client.pragma('foreign_key_check')).toEqual([])
    const detectors = a.db.$client.prepare('select count(*) as n from detectors').get() as { n: number }
    expect(detectors.n).toBe(SCALES.small.detectors)
    // Row totals were rebuilt after the bulk load and match real counts.
    const kept = a.db.$client.prepare("select rows from table_counts where name = 'events'").get() as { rows: number }
    const real = a.db.$client.prepare('select count(*) as n from events').get() as { n: number }
    expect(kept.rows).toBe(real.n)
  })

  it('small carries the mix the console must handle', () => {
    const s = seededDb('small')
    made.push(s.cleanup)
    const q = s.db.$client
    const n = (sql: string) => (q.prepare(sql).get() as { n: number }).n
    expect(n("select count(*) as n from detectors where due_status = 'overdue'")).toBeGreaterThan(0)
    expect(n("select count(*) as n from detectors where state = 'trouble'")).toBeGreaterThan(0)
    expect(n("select count(*) as n from detectors where environment in ('humid','kitchen')")).toBeGreaterThan(0)
    expect(n("select count(*) as n from detectors where delay_agreement = 'disagree'")).toBeGreaterThan(0)
    expect(n("select count(*) as n from detectors where alarm_terminal = 'NC' or eol_placement = 'across-pair'")).toBeGreaterThan(0)
    expect(n("select count(*) as n from users where email like '%@ductkeeper.test'")).toBeGreaterThanOrEqual(5)
    for (const role of ['admin', 'lead', 'office', 'technician', 'manager']) {
      expect(n(`select count(*) as n from users where role = '${role}'`)).toBeGreaterThan(0)
    }
  })

  it('demo reaches its counts', () => {
    const d = seededDb('demo')
    made.push(d.cleanup)
    const q = d.db.$client
    const n = (t: string) => (q.prepare(`select count(*) as n from ${t}`).get() as { n: number }).n
    expect(n('detectors')).toBeGreaterThanOrEqual(10_000)
    expect(n('events')).toBeGreaterThanOrEqual(250_000)
    expect(q.pragma('foreign_key_check')).toEqual([])
  })
})
