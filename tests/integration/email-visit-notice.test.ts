import { http, HttpResponse } from 'msw'
import { afterAll, beforeEach, describe, expect, it } from 'vitest'
import { visitRecord } from '~/.server/repos/visit'
import { applyEmailIntent } from '~/.server/visits/notice-email'
import { VisitRefusal } from '~/.server/visits/refusal'
import { applyVisitIntent, type Actor } from '~/.server/visits/work'
import { resendApiBase, startResendFake } from '../../mocks/resend'
import { seededDb, TEST_TODAY } from '../setup/temp-db'

// The notice of work and the all-clear e-mailed to a site's monitoring company, asserted on what the
// provider's API received (the fake in mocks/resend.ts) and on the visit's log.
const { db, cleanup } = seededDb('small')
const fake = startResendFake()
afterAll(cleanup)
beforeEach(() => fake.server.resetHandlers())

const q = db.$client
const office: Actor = { id: q.prepare(`select id from users where email = 'office@ductkeeper.test'`).pluck().get() as number, role: 'office' }
const ctx = { today: TEST_TODAY, now: new Date('2026-06-15T14:00:00.000Z') }
const version = (visitId: number) => q.prepare('select version from visits where id = ?').pluck().get(visitId) as number
const sentTo = (visitId: number) => fake.messages.filter((m) => m.idempotencyKey?.startsWith(`notice:${visitId}:`))

interface Open {
  id: number
  site: string
  account: string | null
  street: string
  city: string
  postal: string
  tz: string
  email: string
  technician: string | null
}
// Planned visits with no notice yet, at sites whose monitoring company takes e-mail.
const open = q
  .prepare(
    `select v.id, s.name as site, s.monitoring_account as account, s.street, s.city, s.postal_code as postal, s.time_zone as tz, m.email, t.name as technician
       from visits v join sites s on s.id = v.site_id join monitoring_companies m on m.id = s.monitoring_company_id left join users t on t.id = v.technician_id
      where v.status = 'planned' and m.email is not null and v.technician_id is not null
        and not exists (select 1 from notifications n where n.visit_id = v.id)
      order by v.id limit 4`,
  )
  .all() as Open[]

const notice = (visitId: number) => ({
  intent: 'email-notice' as const,
  version: version(visitId),
  inTestFrom: '2026-06-15T15:00:00.000Z',
  inTestUntil: '2026-06-15T19:00:00.000Z',
  callBack: '(503) 555-0134',
  siteManagementTold: true,
  siteContact: 'Priya at the front desk',
})

describe('notice of work by e-mail', () => {
  it('has visits to work on', () => expect(open.length).toBe(4))

  it('sends the site, account, address, detectors, window, technician and call-back number, and logs it as the notice', async () => {
    const v = open[0]
    const r = await applyEmailIntent(db, office, v.id, notice(v.id), ctx)
    expect(r.outcome).toBe('sent')
    const [m, ...more] = sentTo(v.id)
    expect(more).toEqual([])
    expect(m.idempotencyKey).toBe(`notice:${v.id}:notice`)
    expect(m.to).toEqual([v.email])
    expect(m.subject).toContain(v.site)
    const tags = q.prepare('select d.tag from visit_detectors vd join detectors d on d.id = vd.detector_id where vd.visit_id = ?').pluck().all(v.id) as string[]
    expect(tags.length).toBeGreaterThan(0)
    for (const body of [m.html, m.text]) {
      expect(body).toContain(v.site)
      if (v.account) expect(body).toContain(v.account)
      expect(body).toContain(v.street)
      expect(body).toContain(v.postal)
      for (const tag of tags.slice(0, 40)) expect(body).toContain(tag)
      expect(body).toContain(v.technician!)
      expect(body).toContain('(503) 555-0134')
      expect(body).toContain('Priya at the front desk')
    }
    // The window on the site's clock, with its zone.
    const from = new Intl.DateTimeFormat('en-US', { timeZone: v.tz, hour: '2-digit', minute: '2-digit', hourCycle: 'h23' }).format(new Date('2026-06-15T15:00:00.000Z'))
    expect(m.text).toContain(from)
    expect(m.html).toContain('href="tel:5035550134"')

    const logged = q.prepare('select method, spoke_with as spokeWith, confirmation, in_test_from as f from notifications where visit_id = ?').all(v.id)
    expect(logged).toEqual([{ method: 'email', spokeWith: v.email, confirmation: `e-mail message ${r.outboxId}`, f: '2026-06-15T15:00:00.000Z' }])
    const record = visitRecord(db, v.id)!
    expect(record.visit.status).toBe('notified')
    expect(record.emails).toMatchObject([{ id: r.outboxId, kind: 'notice', status: 'sent', providerId: m.id, error: null }])
  })

  it('sending twice sends once: again with the new version, and two at once with the same version', async () => {
    const v = open[0]
    const before = fake.messages.length
    expect((await applyEmailIntent(db, office, v.id, notice(v.id), ctx)).outcome).toBe('already')

    const w = open[1]
    const body = notice(w.id)
    const both = await Promise.allSettled([applyEmailIntent(db, office, w.id, body, ctx), applyEmailIntent(db, office, w.id, body, ctx)])
    expect(both.map((b) => b.status).sort()).toEqual(['fulfilled', 'rejected'])
    const refused = both.find((b) => b.status === 'rejected') as PromiseRejectedResult
    expect(refused.reason).toBeInstanceOf(VisitRefusal)
    expect((refused.reason as VisitRefusal).status).toBe(409)
    expect(fake.messages.length).toBe(before + 1)
    expect(sentTo(v.id)).toHaveLength(1)
    expect(sentTo(w.id)).toHaveLength(1)
    expect(q.prepare('select count(*) from notifications where visit_id in (?, ?)').pluck().get(v.id, w.id)).toBe(2)
    expect(q.prepare(`select count(*) from email_outbox where idempotency_key in (?, ?)`).pluck().get(`notice:${v.id}:notice`, `notice:${w.id}:notice`)).toBe(2)
  })

  it('a refused message shows as failed with the reason, holds the start, and goes when retried', async () => {
    const v = open[2]
    fake.server.use(
      http.post(`${resendApiBase()}/emails`, () => HttpResponse.json({ statusCode: 422, name: 'validation_error', message: 'The to address is on the suppression list' }, { status: 422 }), { once: true }),
    )
    const r = await applyEmailIntent(db, office, v.id, notice(v.id), ctx)
    expect(r.outcome).toBe('failed')
    expect(sentTo(v.id)).toHaveLength(0)
    const failed = visitRecord(db, v.id)!.emails[0]
    expect(failed.status).toBe('failed')
    expect(failed.error).toContain('422: The to address is on the suppression list')

    // The company has not been told: work may not start on this notice.
    expect(() => applyVisitIntent(db, office, v.id, { intent: 'start', version: version(v.id) }, ctx)).toThrow(/did not go \(422: The to address is on the suppression list/)

    const again = await applyEmailIntent(db, office, v.id, { intent: 'retry-email', version: version(v.id), kind: 'notice' }, ctx)
    expect(again).toEqual({ outboxId: r.outboxId, outcome: 'sent' })
    expect(sentTo(v.id)).toHaveLength(1)
    expect(visitRecord(db, v.id)!.emails[0]).toMatchObject({ status: 'sent', attempts: 2 })
    // A sent message is not sent again.
    await expect(applyEmailIntent(db, office, v.id, { intent: 'retry-email', version: version(v.id), kind: 'notice' }, ctx)).rejects.toMatchObject({ status: 409 })
    applyVisitIntent(db, office, v.id, { intent: 'start', version: version(v.id) }, ctx)
    expect(visitRecord(db, v.id)!.visit.status).toBe('in-progress')
  })

  it('the all-clear goes once, clears the notice and is logged with its message', async () => {
    const v = open[2]
    const r = await applyEmailIntent(db, office, v.id, { intent: 'email-all-clear', version: version(v.id), callBack: '(503) 555-0134' }, ctx)
    expect(r.outcome).toBe('sent')
    const m = sentTo(v.id).find((x) => x.idempotencyKey === `notice:${v.id}:all-clear`)!
    expect(m.subject).toMatch(/^All clear: /)
    expect(m.text).toContain('take the account out of test')
    expect(m.text).toContain(v.site)
    const cleared = q.prepare('select cleared_at as at, cleared_with as w from notifications where visit_id = ?').get(v.id) as { at: string; w: string }
    expect(cleared).toEqual({ at: '2026-06-15T14:00:00.000Z', w: `${v.email} (e-mail message ${r.outboxId})` })
    expect((await applyEmailIntent(db, office, v.id, { intent: 'email-all-clear', version: version(v.id), callBack: '(503) 555-0134' }, ctx)).outcome).toBe('already')
    expect(sentTo(v.id).filter((x) => x.idempotencyKey === `notice:${v.id}:all-clear`)).toHaveLength(1)
  })

  it('is refused to a technician on a visit not theirs, and where the company has no e-mail', async () => {
    const v = open[3]
    const other = q.prepare(`select id from users where role = 'technician' and id <> (select technician_id from visits where id = ?) limit 1`).pluck().get(v.id) as number
    await expect(applyEmailIntent(db, { id: other, role: 'technician' }, v.id, notice(v.id), ctx)).rejects.toMatchObject({ status: 403 })
    q.prepare('update monitoring_companies set email = null where id = (select s.monitoring_company_id from visits v join sites s on s.id = v.site_id where v.id = ?)').run(v.id)
    await expect(applyEmailIntent(db, office, v.id, notice(v.id), ctx)).rejects.toMatchObject({ status: 409, message: expect.stringContaining('no e-mail address') })
    expect(sentTo(v.id)).toHaveLength(0)
  })

  it('a call-back number that is not one is refused by the form schema', async () => {
    const { visitIntent } = await import('~/domain/visit-forms')
    expect(visitIntent.safeParse({ ...notice(open[3].id), callBack: 'call me' }).success).toBe(false)
    expect(visitIntent.safeParse({ ...notice(open[3].id), callBack: '555' }).success).toBe(false)
    expect(visitIntent.safeParse({ ...notice(open[3].id), callBack: '+1 503 555 0134 ext 12' }).success).toBe(true)
  })
})
