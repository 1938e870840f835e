import { describe, expect, it } from 'vitest'
import { useSeededServer } from '#tests/setup/fixture'
import { sessionCookieFor, userIdByEmail } from '#tests/setup/sessions'

describe('cleaning cycle in the browser', () => {
  const t = useSeededServer('small', { browser: true })

  it('an office user plans a cleaning cycle for humid locations and creates it', async () => {
    const q = t.data.db.$client
    q.exec('delete from closed_days; delete from observed_holidays')
    const cleaning = () => (q.prepare("select count(*) as n from visits where kind = 'cleaning' and status = 'planned'").get() as { n: number }).n
    const { cookie } = await sessionCookieFor(t.data.db, userIdByEmail(t.data.db, 'office@ductkeeper.test'))
    const context = await t.browser.newContext({ viewport: { width: 1440, height: 900 } })
    const [name, ...value] = cookie.split('=')
    await context.addCookies([{ name, value: value.join('='), domain: '127.0.0.1', path: '/' }])
    const page = await context.newPage()
    await page.goto(`${t.server.url}/cycles`, { waitUntil: 'networkidle' })
    await page.getByRole('heading', { name: 'Cleaning cycles' }).waitFor()
    // Humid only, due within a year so the small demo has some.
    await page.getByRole('checkbox', { name: 'Kitchen' }).uncheck()
    await expect.poll(() => page.getByRole('checkbox', { name: 'Humid' }).isChecked()).toBe(true)
    await page.getByLabel('Cleaning due within (days)').fill('365')
    const due = (q.prepare("select count(*) as n from detectors where environment = 'humid' and next_cleaning_on <= date('2026-06-15', '+365 days')").get() as { n: number }).n
    expect(due).toBeGreaterThan(0)

    const before = cleaning()
    const lastId = (q.prepare('select max(id) as m from visits').get() as { m: number }).m
    await page.getByRole('button', { name: 'Preview the plan' }).click()
    const grid = page.getByRole('region', { name: 'Proposed visits' })
    await grid.waitFor()
    const visits = await grid.locator('[data-visit]').count()
    expect(visits).toBeGreaterThan(0)
    const summary = (await page.getByRole('region', { name: 'Preview' }).locator('p').first().textContent()) ?? ''
    expect(summary).toMatch(new RegExp(`Book ${visits} cleaning visits? for \\d+ detectors?`))
    expect(cleaning()).toBe(before)
    await page.getByRole('button', { name: `Create ${visits} cleaning visit${visits === 1 ? '' : 's'}` }).click()
    await page.getByText(/Done: Book \d+ cleaning visits?/).waitFor()
    expect(cleaning()).toBe(before + visits)
    const tasks = q.prepare("select distinct vd.tasks from visit_detectors vd join visits v on v.id = vd.visit_id where v.kind = 'cleaning' and v.id > ?").all(lastId) as Array<{ tasks: string }>
    expect(tasks).toEqual([{ tasks: 'cleaning' }])
    await context.close()
  })
})
