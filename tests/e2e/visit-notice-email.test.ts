import { describe, expect, it } from 'vitest'
import { DEMO_EMAIL, useSeededServer } from '#tests/setup/fixture'
import { userIdByEmail } from '#tests/setup/sessions'
import { signInAs } from '#tests/setup/sign-in-browser'

describe('the notice of work e-mailed from a phone', () => {
  const t = useSeededServer('small', { browser: true })

  it('a technician on a roof sends the notice by e-mail, sees it sent, and may then start', async () => {
    const db = t.data.db.$client
    const techId = userIdByEmail(t.data.db, DEMO_EMAIL.technician)
    const visit = db
      .prepare(
        `select v.id, m.email from visits v join sites s on s.id = v.site_id join monitoring_companies m on m.id = s.monitoring_company_id
          where v.status = 'planned' and m.email is not null and not exists (select 1 from notifications n where n.visit_id = v.id)
          order by v.scheduled_on, v.id limit 1`,
      )
      .get() as { id: number; email: string }
    expect(visit).toBeTruthy()
    // Technicians record work only on their own visits: this one is theirs.
    db.prepare('update visits set technician_id = ?, version = version + 1 where id = ?').run(techId, visit.id)

    const context = await t.browser.newContext({ viewport: { width: 390, height: 844 }, isMobile: true, hasTouch: true })
    const page = await context.newPage()
    await signInAs(page, t.server.url, DEMO_EMAIL.technician, `/visits/${visit.id}`)
    await page.goto(`${t.server.url}/visits/${visit.id}`)
    const form = page.getByRole('form', { name: 'E-mail the notice' })
    await form.getByText(visit.email).waitFor()
    await form.getByLabel(/Call-back number/).fill('(503) 555-0134')
    // Nothing goes until every question is answered.
    await form.getByRole('button', { name: 'Send notice by e-mail' }).click()
    await form.getByText('Say whether site management was told.').waitFor()
    await form.getByRole('group', { name: 'Has site management been told?' }).getByRole('button', { name: 'No' }).click()
    await form.getByRole('button', { name: 'Send notice by e-mail' }).click()

    const line = page.locator('[data-email-kind="notice"]')
    await line.getByText(/Sent$/).waitFor()
    await line.getByText(/provider id fake-/).waitFor()
    expect(await page.evaluate(() => document.documentElement.scrollWidth <= window.innerWidth)).toBe(true)
    const row = db.prepare(`select id, status, html from email_outbox where idempotency_key = ?`).get(`notice:${visit.id}:notice`) as { id: number; status: string; html: string }
    expect(row.status).toBe('sent')
    expect(row.html).toContain('(503) 555-0134')
    expect(db.prepare('select method, confirmation from notifications where visit_id = ?').all(visit.id)).toEqual([{ method: 'email', confirmation: `e-mail message ${row.id}` }])

    await page.getByRole('button', { name: 'Start work' }).click()
    await page.getByRole('heading', { name: 'Record the work' }).waitFor()
    await context.close()
  })
})
