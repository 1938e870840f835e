import { execFile } from 'node:child_process'
import { promisify } from 'node:util'
import { afterAll, describe, expect, it } from 'vitest'
import { digestFigures, digestKey, isoWeek } from '~/.server/email/digest'
import { digestMessage } from '~/.server/email/digest-message'
import { runDigests } from '~/.server/email/schedule'
import { startResendFake } from '../../mocks/resend'
import { seededDb, TEST_TODAY } from '../setup/temp-db'

const run = promisify(execFile)
const childEnv = () => {
  const env = { ...process.env }
  delete env.RESEND_API_KEY
  delete env.OFFICE_TODAY
  return env
}
const { db, path, cleanup } = seededDb('small')
const fake = startResendFake()
afterAll(cleanup)

const one = (q: string, ...args: unknown[]) => db.$client.prepare(q).pluck().get(...args) as number
// Monday 2026-06-15, 07:00 in the office (America/Chicago, CDT = UTC−5).
const MONDAY_7AM = new Date('2026-06-15T12:00:00.000Z')
const TODAY = TEST_TODAY
const WEEK_AGO = '2026-06-08'

describe('weekly digest figures', () => {
  it('every count matches SQL written here, over the whole fleet', () => {
    const f = digestFigures(db, { today: TODAY, customerIds: null })
    expect(f.detectors).toBe(one(`select count(*) from detectors where state <> 'out-of-service'`))
    expect(f.detectors).toBeGreaterThan(0)
    for (const t of ['visual', 'functional', 'sensitivity', 'cleaning'] as const) {
      expect(f.overdue[t], t).toBe(one(`select count(*) from detectors where state <> 'out-of-service' and next_${t}_on < ?`, TODAY))
      expect(f.dueSoon[t], t).toBe(one(`select count(*) from detectors where state <> 'out-of-service' and next_${t}_on between ? and '2026-06-29'`, TODAY))
    }
    expect(f.overdue.any).toBe(one(`select count(*) from detectors where state <> 'out-of-service' and (next_visual_on < ? or next_functional_on < ? or next_sensitivity_on < ? or next_cleaning_on < ?)`, TODAY, TODAY, TODAY, TODAY))
    expect(f.overdue.any).toBeGreaterThan(0)
    expect(f.trouble.now).toBe(one(`select count(*) from detectors where state = 'trouble'`))
    expect(f.failedTests.thisWeek).toBe(one(`select count(*) from task_results where outcome = 'fail' and done_on > ? and done_on <= ? and visit_id is not null`, WEEK_AGO, TODAY))
    expect(f.failedDiagnoses.now).toBe(one(`select count(*) from detectors where loop_verdict = 'fail'`))
    expect(f.delayDisagree).toBe(one(`select count(*) from detectors where delay_agreement = 'disagree'`))
    expect(f.visitsDone.thisWeek).toBe(one(`select count(*) from visits where status = 'done' and scheduled_on > ? and scheduled_on <= ?`, WEEK_AGO, TODAY))
    expect(f.visitsPlanned).toBe(one(`select count(*) from visits where status in ('planned','notified','in-progress') and scheduled_on >= ? and scheduled_on < '2026-06-22'`, TODAY))
    expect(f.notices.thisWeek).toBe(one(`select count(*) from notifications where notified_at > ? and notified_at < '2026-06-16'`, WEEK_AGO))
    const top = db.$client.prepare(`select id from detectors where risk_score > 0 order by risk_score desc, id limit 5`).pluck().all()
    expect(f.atRisk.map((d) => d.id)).toEqual(top)
  })

  it('a manager following one customer sees only that customer', () => {
    const customerId = one(`select customer_id from detectors group by customer_id order by count(*) desc limit 1`)
    const f = digestFigures(db, { today: TODAY, customerIds: [customerId] })
    expect(f.detectors).toBe(one(`select count(*) from detectors where state <> 'out-of-service' and customer_id = ?`, customerId))
    expect(f.detectors).toBeLessThan(one(`select count(*) from detectors where state <> 'out-of-service'`))
    expect(f.visitsDone.thisWeek).toBe(one(`select count(*) from visits v join sites s on s.id = v.site_id where s.customer_id = ? and v.status = 'done' and v.scheduled_on > ? and v.scheduled_on <= ?`, customerId, WEEK_AGO, TODAY))
  })

  it('renders HTML and text with absolute links to the views', async () => {
    process.env.APP_URL = 'https://ductkeeper.example.test'
    try {
      const m = await digestMessage(db, { userId: 5, email: 'manager@ductkeeper.test', name: 'Manager', customerIds: [] }, TODAY)
      const overdue = one(`select count(*) from detectors where state <> 'out-of-service' and (next_visual_on < ? or next_functional_on < ? or next_sensitivity_on < ? or next_cleaning_on < ?)`, TODAY, TODAY, TODAY, TODAY)
      expect(m.subject).toContain(`${overdue} overdue`)
      expect(m.html).toContain('href="https://ductkeeper.example.test/devices?due=overdue"')
      expect(m.text).toContain(`${overdue}`)
      expect(m.text).toMatch(/Detectors overdue/)
      expect(m.html).toMatch(/prefers-color-scheme: dark/)
      expect(m.idempotencyKey).toBe(`digest:5:${isoWeek(TODAY)}`)
    } finally {
      delete process.env.APP_URL
    }
  })
})

describe('digest schedule', () => {
  const recipients = () => db.$client.prepare(`select recipient_user_id as u, count(*) as n from email_outbox where kind = 'digest' group by recipient_user_id order by u`).all() as { u: number; n: number }[]
  const receivers = () => one(`select count(*) from users where active = 1 and role in ('manager','lead','admin')`)

  it('ISO weeks', () => {
    expect(isoWeek('2026-06-15')).toBe('2026-W25')
    expect(isoWeek('2027-01-01')).toBe('2026-W53')
    expect(isoWeek('2024-12-30')).toBe('2025-W01')
  })

  it('a manager who switched the digest off gets none; the others one each, across two runs and a restart', async () => {
    const manager = one(`select id from users where email = 'manager@ductkeeper.test'`)
    db.$client.prepare('insert into digest_settings (user_id, enabled, weekday, hour) values (?, 0, 1, 7)').run(manager)
    // Sunday evening and Monday 06:00: not yet.
    expect((await runDigests(db, new Date('2026-06-15T11:00:00.000Z'))).due).toBe(0)
    const first = await runDigests(db, MONDAY_7AM)
    expect(first.queued).toBe(receivers() - 1)
    const second = await runDigests(db, new Date('2026-06-15T15:00:00.000Z'))
    expect(second.queued).toBe(0)
    expect(recipients().every((r) => r.n === 1)).toBe(true)
    expect(recipients().map((r) => r.u)).not.toContain(manager)
    expect(one(`select count(*) from email_outbox where kind = 'digest' and status = 'sent'`)).toBe(receivers() - 1)
    expect(fake.messages.filter((m) => m.idempotencyKey?.startsWith('digest:')).length).toBe(receivers() - 1)
    // The next week brings the next one.
    const next = await runDigests(db, new Date('2026-06-22T12:00:00.000Z'))
    expect(next.queued).toBe(receivers() - 1)
    expect(one(`select count(*) from email_outbox where idempotency_key = ?`, digestKey(1, '2026-06-22'))).toBe(1)
  })

  it('two `npm run digest` processes started together send one digest per recipient', async () => {
    const at = '2026-06-29T12:30:00Z'
    const cmd = (): Promise<{ stdout: string }> => run('node_modules/.bin/tsx', ['scripts/digest.ts', '--at', at, '--db', path], { env: childEnv() })
    const outs = await Promise.all([cmd(), cmd()])
    expect(outs.map((o) => o.stdout).join('')).toMatch(/Digests for 2026-06-29/)
    const keys = db.$client.prepare(`select idempotency_key as k, status from email_outbox where idempotency_key like 'digest:%:2026-W27'`).all() as { k: string; status: string }[]
    expect(keys).toHaveLength(receivers() - 1)
    expect(new Set(keys.map((k) => k.k)).size).toBe(keys.length)
    expect(keys.every((k) => k.status === 'sent')).toBe(true)
  }, 60_000)
})
