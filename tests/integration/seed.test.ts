import Holidays from 'date-holidays'
import { afterAll, describe, expect, it } from 'vitest'
import { checkDatabase } from '~/.server/db-check'
import { SCALES } from '~/.server/seed/generate'
import { repeatsAWord } from '~/.server/seed/names'
import { calendarFor } from '~/domain/calendar'
import { seededDb, TEST_TODAY } from '#tests/setup/temp-db'

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

// The demo must read true to the trade and stay wholly invented; checked on both prebuilt scales.
describe.each(['small', 'demo'] as const)('the %s demo reads true to the trade', (scale) => {
  const s = seededDb(scale)
  afterAll(() => s.cleanup())
  const all = <T,>(sql: string, ...args: unknown[]) => s.db.$client.prepare(sql).all(...args) as T[]
  const n = (sql: string) => (s.db.$client.prepare(sql).get() as { n: number }).n
  // Written apart from the generator's own check, so a fault in one is caught by the other.
  const repeated = (name: string) => {
    const words: string[] = name.toLowerCase().match(/[a-z0-9']+/g) ?? []
    return words.find((w, i) => words.indexOf(w) !== i) ?? null
  }

  it('names models of an invented maker, each with a listed sensitivity range the recorded tests agree with', () => {
    const models = all<{ id: number; name: string; low: number; high: number }>(
      'select id, name, sensitivity_low_pct_ft as low, sensitivity_high_pct_ft as high from detector_models order by id',
    )
    expect(models.length).toBeGreaterThanOrEqual(4)
    for (const m of models) {
      expect(m.name).not.toMatch(/demo/i)
      expect(m.name).toMatch(/^Orlwyn ODM-\d{3}[A-Z]* .*photoelectric duct module/)
      // Photoelectric duct heads are listed at a few tenths to a few %/ft (common practice).
      expect(m.low).toBeGreaterThanOrEqual(0.5)
      expect(m.high).toBeLessThanOrEqual(4)
      expect(m.low).toBeLessThan(m.high)
    }
    expect(models.filter((m) => /NEMA 4X/.test(m.name))).toHaveLength(1)
    expect(models.filter((m) => /relay board/.test(m.name)).length).toBeGreaterThanOrEqual(2)
    // A sensitivity test passes exactly when its reading lies inside the detector's listed range.
    const wrong = n(`select count(*) as n from task_results r join detectors d on d.id = r.detector_id join detector_models m on m.id = d.model_id
       where r.task = 'sensitivity' and (r.value between m.sensitivity_low_pct_ft and m.sensitivity_high_pct_ft) != (r.outcome = 'pass')`)
    expect(wrong).toBe(0)
    expect(n("select count(*) as n from task_results where task = 'sensitivity'")).toBeGreaterThan(10)
    // Detectors in NEMA 4X places carry the module built in that housing.
    expect(n(`select count(*) as n from detectors d join detector_models m on m.id = d.model_id where d.housing = 'nema4x' and m.name not like '%NEMA 4X%'`)).toBe(0)
  })

  it('tags every unit with the prefix of its kind', () => {
    const units = all<{ tag: string; kind: string }>('select tag, kind from units')
    expect(units.length).toBeGreaterThan(50)
    const wrong = units.filter((u) => !new RegExp(`^${u.kind.toUpperCase()}-\\d+$`).test(u.tag))
    expect(wrong).toEqual([])
    expect(new Set(units.map((u) => u.kind)).size).toBeGreaterThanOrEqual(4)
    // A make-up air unit brings in outdoor air only: supply detectors, no return air.
    expect(n("select count(*) as n from detectors d join units u on u.id = d.unit_id where u.kind = 'mau' and d.position = 'return'")).toBe(0)
  })

  it('gives every telephone number an area code and a 555-01xx number', () => {
    const phones = all<{ phone: string }>('select contact_phone as phone from customers union all select phone from monitoring_companies').map((p) => p.phone)
    expect(phones.length).toBeGreaterThan(8)
    expect(phones.filter((p) => !/^\([2-9]\d{2}\) 555-01\d{2}$/.test(p))).toEqual([])
  })

  it('has every finished visit cover detectors, each with results its task results agree with', () => {
    expect(n("select count(*) as n from visits v where v.status = 'done' and not exists (select 1 from visit_detectors vd where vd.visit_id = v.id)")).toBe(0)
    expect(n("select count(*) as n from visit_detectors vd join visits v on v.id = vd.visit_id where v.status = 'done' and vd.result not in ('pass', 'fail')")).toBe(0)
    // The tasks listed on the visit are exactly the tasks with a result from that visit.
    const done = new Map(
      all<{ key: string; tasks: string; failed: number }>(
        `select visit_id || '/' || detector_id as key, group_concat(task) as tasks, max(outcome = 'fail') as failed from task_results group by visit_id, detector_id`,
      ).map((r) => [r.key, { tasks: r.tasks.split(',').sort().join(','), failed: r.failed === 1 }]),
    )
    const rows = all<{ key: string; tasks: string; result: string }>(
      `select vd.visit_id || '/' || vd.detector_id as key, vd.tasks, vd.result from visit_detectors vd join visits v on v.id = vd.visit_id where v.status = 'done'`,
    )
    expect(rows.length).toBeGreaterThan(100)
    const off = rows.filter((r) => r.tasks.split(',').sort().join(',') !== done.get(r.key)?.tasks || (r.result === 'fail') !== done.get(r.key)?.failed)
    expect(off).toEqual([])
    // Every result on record belongs to a finished visit that lists the detector.
    expect(n(`select count(*) as n from task_results r where not exists (select 1 from visit_detectors vd join visits v on v.id = vd.visit_id
       where vd.visit_id = r.visit_id and vd.detector_id = r.detector_id and v.status = 'done')`)).toBe(0)
    // Planned visits each cover at least one detector too.
    expect(n("select count(*) as n from visits v where not exists (select 1 from visit_detectors vd where vd.visit_id = v.id)")).toBe(0)
  })

  it('uses no word twice in a site, street or customer name', () => {
    const names = all<{ name: string }>('select name from sites union all select street from sites union all select name from customers').map((r) => r.name)
    expect(names.length).toBeGreaterThan(20)
    expect(names.filter((name) => repeated(name) !== null)).toEqual([])
    expect(repeated('Harbor Lantern Lantern Drive')).toBe('lantern')
    expect(repeatsAWord('Harbor Lantern Lantern Drive')).toBe(true)
    expect(repeatsAWord('Fig & Thistle Dunmore Bay')).toBe(false)
    expect(new Set(all<{ name: string }>('select name from sites').map((r) => r.name)).size).toBe(n('select count(*) as n from sites'))
  })

  it('gives technicians the regions of the sites they visit and a daily capacity in detectors', () => {
    const techs = all<{ id: number; regions: string | null; cap: number | null; unit: string }>(
      "select id, regions, daily_capacity as cap, capacity_unit as unit from users where role = 'technician' order by id",
    )
    expect(techs.length).toBeGreaterThanOrEqual(3)
    for (const t of techs) {
      expect(t.regions).toMatch(/^US-[A-Z]{2}(,US-[A-Z]{2})*$/)
      expect(t.cap).toBeGreaterThanOrEqual(24)
      expect(t.cap).toBeLessThanOrEqual(40)
      expect(t.unit).toBe('detectors')
    }
    const visits = all<{ region: string; regions: string }>(
      'select s.region, u.regions from visits v join sites s on s.id = v.site_id join users u on u.id = v.technician_id',
    )
    expect(visits.length).toBeGreaterThan(100)
    expect(visits.filter((v) => !v.regions.split(',').includes(v.region))).toEqual([])
    // Every region with sites is covered by someone.
    const covered = new Set(techs.flatMap((t) => t.regions!.split(',')))
    expect(all<{ region: string }>('select distinct region from sites').filter((r) => !covered.has(r.region))).toEqual([])
  })

  it('keeps a company calendar: observed holidays named as date-holidays names them, closed days ahead', () => {
    const regions = all<{ region: string }>('select distinct region from sites order by region').map((r) => r.region)
    expect(all<{ region: string }>('select distinct region from observed_holidays order by region').map((r) => r.region)).toEqual(regions)
    for (const region of regions) {
      const names = all<{ name: string }>('select name from observed_holidays where region = ?', region).map((r) => r.name)
      expect(names).toEqual(expect.arrayContaining(["New Year's Day", 'Memorial Day', 'Independence Day', 'Labor Day', 'Thanksgiving Day', 'Christmas Day']))
      const [country, state] = region.split('-')
      const hd = new Holidays(country, state)
      const known = new Set([2026, 2027, 2028, 2029, 2030, 2031, 2032].flatMap((y) => hd.getHolidays(y).filter((h) => h.type === 'public').map((h) => h.name)))
      expect(names.filter((name) => !known.has(name))).toEqual([])
    }
    const closed = all<{ day: string; label: string }>('select day, label from closed_days order by day')
    expect(closed.length).toBeGreaterThanOrEqual(2)
    expect(closed.length).toBeLessThanOrEqual(3)
    const us = calendarFor('US')
    for (const c of closed) {
      expect(c.day > TEST_TODAY).toBe(true)
      expect(us.isWorkingDay(c.day), c.day).toBe(true)
      expect(c.label.length).toBeGreaterThan(8)
    }
    // Nothing is planned on a closed day, a weekend or a public holiday at the site.
    const planned = all<{ day: string; region: string }>("select v.scheduled_on as day, s.region from visits v join sites s on s.id = v.site_id where v.status = 'planned'")
    expect(planned.length).toBeGreaterThan(3)
    const closedOn = new Set(closed.map((c) => c.day))
    expect(planned.filter((p) => closedOn.has(p.day) || !calendarFor(p.region).isWorkingDay(p.day))).toEqual([])
    // Past visits fell on weekdays.
    expect(n("select count(*) as n from visits where strftime('%w', scheduled_on) in ('0', '6')")).toBe(0)
  })

  if (scale === 'small') {
    it('passes the database check', () => {
      expect(checkDatabase(s.db, TEST_TODAY, { integrity: 'quick' }).disagreements).toEqual([])
    })
  }
})
