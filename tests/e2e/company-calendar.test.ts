import type { Page } from 'playwright-core'
import { describe, expect, it } from 'vitest'
import { calendarPage } from '~/.server/bulk/calendar'
import { weekday } from '~/domain/dates'
import { DEMO_EMAIL, useSeededServer } from '#tests/setup/fixture'
import { sessionCookieFor, userIdByEmail } from '#tests/setup/sessions'
import { TEST_TODAY } from '#tests/setup/temp-db'

describe('company calendar in Chromium', () => {
  const t = useSeededServer('small', { browser: true })
  const sql = () => t.data.db.$client

  async function pageAs(email: string, path: string): Promise<Page> {
    const { cookie } = await sessionCookieFor(t.data.db, userIdByEmail(t.data.db, email))
    const context = await t.browser.newContext({ viewport: { width: 1440, height: 900 } })
    const [name, ...value] = cookie.split('=')
    await context.addCookies([{ name, value: value.join('='), domain: '127.0.0.1', path: '/' }])
    const page = await context.newPage()
    await page.goto(`${t.server.url}${path}`, { waitUntil: 'networkidle' })
    return page
  }

  it("the admin takes a region's holiday off and closes a day; the lead's booking on either day is refused", async () => {
    sql().exec('delete from closed_days; delete from observed_holidays')
    // The detector the lead will book: the first in the triage queue, and its site's region.
    const first = sql()
      .prepare("select d.id, s.region, s.name as site from detectors d join sites s on s.id = d.site_id where d.risk_reasons != '' and d.acknowledged_at is null order by d.risk_score desc, d.id desc limit 1")
      .get() as { id: number; region: string; site: string }
    // Its open visits are called off, so the booking has work to book.
    sql().prepare("update visits set status = 'cancelled', cancelled_at = '2026-06-15T08:00:00.000Z', cancel_reason = 'Test set-up' where status in ('planned', 'notified') and id in (select visit_id from visit_detectors where detector_id = ?)").run(first.id)
    // A public holiday of that region still to come this year, on a weekday (a weekend is off anyway).
    const holiday = calendarPage(t.data.db, first.region, 2026, TEST_TODAY)
      .holidays.flatMap((h) => h.dates.map((date) => ({ name: h.name, date })))
      .find((h) => h.date > '2026-06-16' && weekday(h.date) >= 1 && weekday(h.date) <= 5)!
    expect(holiday).toBeDefined()
    const closedDay = '2026-06-17'

    const admin = await pageAs(DEMO_EMAIL.admin, `/admin/calendar?region=${first.region}&year=2026`)
    const row = admin.getByRole('row').filter({ hasText: holiday.name })
    expect(await row.getByRole('cell').nth(2).textContent()).toBe('Works')
    await row.getByRole('button', { name: 'Take this day off' }).click()
    await admin.getByRole('status').filter({ hasText: `${holiday.name} is now a day off in ${first.region}.` }).waitFor()
    await expect.poll(() => row.getByRole('cell').nth(2).textContent()).toBe('Closed')

    const closing = admin.getByRole('region', { name: 'Company closed days' })
    await closing.getByRole('textbox', { name: 'Day', exact: true }).fill(closedDay)
    await closing.getByRole('textbox', { name: 'Why', exact: true }).fill('Stocktake')
    await admin.getByRole('button', { name: 'Close that day' }).click()
    await admin.getByRole('status').filter({ hasText: `${closedDay} is a company closed day: Stocktake.` }).waitFor()
    await admin.getByText(`${closedDay} · Stocktake`).waitFor()
    expect(sql().prepare('select region, name from observed_holidays').all()).toEqual([{ region: first.region, name: holiday.name }])
    await admin.context().close()

    const lead = await pageAs(DEMO_EMAIL.lead, '/triage')
    await lead.locator('[data-slot=reasons]').first().waitFor()
    await lead.keyboard.press('x')
    await lead.keyboard.press('Control+k')
    await lead.getByRole('dialog', { name: 'Command palette' }).waitFor()
    await lead.keyboard.type('Book a visit')
    await lead.locator('[cmdk-item][data-value="action:schedule"][data-selected="true"]').waitFor()
    await lead.keyboard.press('Enter')
    const dialog = lead.getByRole('dialog', { name: /^Book a visit for 1 detector/ })
    await dialog.waitFor()
    // One site, so one day field (its label also carries the day's note).
    const day = dialog.locator('input[type=date]')
    await day.waitFor()
    const visits = () => (sql().prepare('select count(*) n from visits').get() as { n: number }).n
    const before = visits()

    // The holiday: the dialog says so before booking, and the server refuses it.
    await day.fill(holiday.date)
    await dialog.getByText(`${holiday.name}: not a working day in ${first.region}.`).waitFor()
    await dialog.getByRole('button', { name: 'Book visit' }).click()
    await expect.poll(() => dialog.getByRole('alert').textContent()).toMatch(new RegExp(`${holiday.date} is not a working day at ${first.site}`))
    expect(visits()).toBe(before)

    // The closed day: refused by the server, with the next working day named.
    await day.fill(closedDay)
    await dialog.getByRole('button', { name: 'Book visit' }).click()
    await expect.poll(() => dialog.getByRole('alert').textContent()).toMatch(new RegExp(`${closedDay} is not a working day at ${first.site} \\(.*Stocktake.*\\); the next one is 2026-06-18`))
    expect(visits()).toBe(before)

    // A working day still books.
    await day.fill('2026-06-18')
    await dialog.getByRole('button', { name: 'Book visit' }).click()
    await lead.getByRole('status').filter({ hasText: 'Booked 1 visit on 2026-06-18 for 1 detector.' }).waitFor()
    expect(visits()).toBe(before + 1)
    await lead.context().close()
  })
})
