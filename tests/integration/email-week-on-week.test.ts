import { afterAll, describe, expect, it } from 'vitest'
import { createDb } from '~/.server/db'
import { digestMessage, queueDigest } from '~/.server/email/digest-message'
import { startResendFake } from '../../mocks/resend'
import { tempDbPath } from '../setup/temp-db'

// A small fleet written here in SQL, so every figure of the digest is known by hand: one customer,
// one site, ten detectors, and what changes between two Mondays.
const tmp = tempDbPath()
const db = createDb(tmp.path)
startResendFake()
afterAll(() => {
  db.$client.close()
  tmp.cleanup()
})
const sql = (q: string) => db.$client.exec(q)
const WEEK_1 = '2026-06-08' // Monday, ISO week 2026-W24
const WEEK_2 = '2026-06-15' // the Monday after, 2026-W25
const manager = { userId: 1, email: 'manager@ductkeeper.test', name: 'Morgan Reyes', customerIds: [] as number[] }

sql(`
  insert into roles (key, label, description) values ('manager', 'Manager', 'Reads the digest');
  insert into users (id, email, name, role) values (1, 'manager@ductkeeper.test', 'Morgan Reyes', 'manager');
  insert into customers (id, name, kind) values (1, 'Fernhollow Bakeries', 'restaurant');
  insert into sites (id, customer_id, name, street, city, region, postal_code, time_zone, jurisdiction, ahj_name, code_basis)
    values (1, 1, 'Fernhollow Mill Street', '12 Mill Street', 'Ashgrove', 'US-OR', '97001', 'America/Los_Angeles', 'Ashgrove', 'Ashgrove Fire Marshal', 'imc');
  insert into detector_models (id, name, standby_va, alarm_va, velocity_min_fpm, velocity_max_fpm, pressure_min_in_wc, pressure_max_in_wc)
    values (1, 'Test model', 1, 2, 300, 4000, 0.01, 1);
  insert into units (id, site_id, tag, kind, shutdown_input, supply_cfm, return_cfm, duct_shape) values (1, 1, 'RTU-1', 'rtu', 'break-to-stop', 2400, 2400, 'rectangular');
  with recursive n(i) as (select 1 union all select i + 1 from n where i < 10)
  insert into detectors (id, unit_id, site_id, customer_id, model_id, tag, position, housing, environment, installed_on, eol_ohms, eol_placement,
                         alarm_terminal, supervisory_terminal, conductor_awg, conductor_stranded, run_feet, velocity_min_fpm, velocity_max_fpm,
                         pressure_min_in_wc, pressure_max_in_wc, next_visual_on, next_functional_on, next_sensitivity_on, next_cleaning_on)
    select i, 1, 1, 1, 1, 'DD-' || i, 'supply', 'standard', 'clean', '2020-01-01', 15000, 'in-series', 'no', 'no', 18, 0, 40, 300, 4000, 0.01, 1,
           '2026-12-01', '2026-12-01', '2026-12-01', '2026-12-01' from n;
`)

/** Week 1: 2 overdue, 1 falling due, 3 in trouble, 1 delay disagreement, 1 visit done, 0 failed tests. */
function weekOne() {
  sql(`
    update detectors set next_visual_on = '2026-06-01' where id in (1, 2);
    update detectors set next_functional_on = '2026-06-12' where id = 3;
    update detectors set state = 'trouble' where id in (4, 5, 6);
    update detectors set delay_agreement = 'disagree' where id = 7;
    insert into visits (id, site_id, kind, scheduled_on, status) values (1, 1, 'inspection', '2026-06-05', 'done');
  `)
}

/** Week 2: 5 overdue (up 3), 3 falling due (up 2), 1 in trouble (down 2), 2 failed tests, delay unchanged. */
function weekTwo() {
  sql(`
    update detectors set next_visual_on = '2026-06-10' where id in (3, 8, 9);
    update detectors set next_cleaning_on = '2026-06-20' where id in (1, 4, 10);
    update detectors set state = 'normal' where id in (4, 5);
    insert into visits (id, site_id, kind, scheduled_on, status) values (2, 1, 'inspection', '2026-06-12', 'done'), (3, 1, 'inspection', '2026-06-13', 'done');
    insert into task_results (detector_id, visit_id, task, done_on, outcome) values (6, 2, 'functional', '2026-06-12', 'fail'), (7, 3, 'functional', '2026-06-13', 'fail');
  `)
}

const snapshot = (week: string) => {
  const row = db.$client.prepare('select figures from digest_snapshots where user_id = 1 and week = ?').pluck().get(week) as string | undefined
  return row ? JSON.parse(row) : undefined
}

describe('week-on-week changes in the digest', () => {
  it('keeps the figures of the digest queued for the week, not of a preview', async () => {
    weekOne()
    await digestMessage(db, manager, WEEK_1)
    expect(snapshot('2026-W24')).toBeUndefined()
    const first = await queueDigest(db, manager, WEEK_1)
    expect(first.created).toBe(true)
    expect(snapshot('2026-W24')).toEqual({
      overdue: 2,
      dueSoon: 1,
      trouble: 3,
      failedTests: 0,
      failedDiagnoses: 0,
      delayDisagree: 1,
      visitsDone: 1,
      visitsPlanned: 0,
      notices: 0,
    })
    // No digest was kept the week before: the standing figures show no arrow.
    const text = db.$client.prepare('select text from email_outbox where id = ?').pluck().get(first.id) as string
    expect(text).toMatch(/2\s*\S*\s*Detectors overdue\s*\n/)
    expect(text).not.toContain('Detectors overdue (')
  })

  it('a second queue in the same week keeps the first figures', async () => {
    sql(`update detectors set next_visual_on = '2026-06-01' where id = 10`)
    const again = await queueDigest(db, manager, WEEK_1)
    expect(again.created).toBe(false)
    expect(snapshot('2026-W24').overdue).toBe(2)
    sql(`update detectors set next_visual_on = '2026-12-01' where id = 10`)
  })

  it('the next week shows each change with its arrow and in words', async () => {
    weekTwo()
    const { id } = await queueDigest(db, manager, WEEK_2)
    const { text, html } = db.$client.prepare('select text, html from email_outbox where id = ?').get(id) as { text: string; html: string }
    expect(snapshot('2026-W25')).toMatchObject({ overdue: 5, dueSoon: 3, trouble: 1, failedTests: 2, delayDisagree: 1, visitsDone: 2 })
    const line = (label: string) => text.split('\n').find((l) => l.includes(label)) ?? ''
    expect(line('Detectors overdue')).toContain('▲ up 3 from 2 last week')
    expect(line('Falling due in the next two weeks')).toContain('▲ up 2 from 1 last week')
    expect(line('In trouble now')).toContain('▼ down 2 from 3 last week')
    expect(line('Failed tests this week')).toContain('▲ up 2 from 0 last week')
    expect(line('Reporting delay differs from policy')).toContain('= same as last week')
    expect(line('Visits done this week')).toContain('▲ up 1 from 1 last week')
    expect(html).toContain('up 3 from 2 last week')
    expect(line("Detectors overdue")).toBe("5 Detectors overdue (▲ up 3 from 2 last week)")
  })
})
