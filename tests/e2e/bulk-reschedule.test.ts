import { describe, expect, it } from 'vitest'
import { makeVisits } from '#tests/setup/bulk'
import { useSeededServer } from '#tests/setup/fixture'
import { sessionCookieFor, userIdByEmail } from '#tests/setup/sessions'

describe('bulk reschedule from the keyboard', () => {
  const t = useSeededServer('small', { browser: true })

  it('an office user selects 50 visits, previews a shift of two working days, applies it and undoes it', async () => {
    const q = t.data.db.$client
    q.exec('delete from closed_days; delete from observed_holidays')
    const siteId = (q.prepare("select id from sites where region = 'US-TX' limit 1").get() as { id: number }).id
    // Tuesday 2026-06-16: two working days later is Thursday the 18th.
    const ids = makeVisits(t.data.db, { n: 60, siteId, date: '2026-06-16', technicianId: null })
    const dates = () => (q.prepare(`select scheduled_on d, count(*) n from visits where id in (${ids.join(',')}) group by d order by d`).all() as Array<{ d: string; n: number }>)

    const { cookie } = await sessionCookieFor(t.data.db, userIdByEmail(t.data.db, 'office@ductkeeper.test'))
    const context = await t.browser.newContext({ viewport: { width: 1440, height: 900 } })
    const [name, ...value] = cookie.split('=')
    await context.addCookies([{ name, value: value.join('='), domain: '127.0.0.1', path: '/' }])
    const page = await context.newPage()
    await page.goto(`${t.server.url}/visits?from=2026-06-16&to=2026-06-16&status=planned&sort=id&dir=asc`, { waitUntil: 'networkidle' })
    await page.getByRole('row').nth(1).getByRole('cell').nth(1).waitFor()

    await page.keyboard.press('x')
    for (let i = 0; i < 49; i++) await page.keyboard.press('Shift+j')
    const bar = page.getByRole('region', { name: 'Change many at once' })
    await expect.poll(() => bar.textContent()).toContain('50 selected visits')

    await page.keyboard.press('Control+k')
    const palette = page.getByRole('dialog', { name: 'Command palette' })
    await palette.waitFor()
    await page.keyboard.type('Reschedule')
    await palette.locator('[cmdk-item][data-value="action:bulk:reschedule"][data-selected="true"]').waitFor()
    await page.keyboard.press('Enter')

    const panel = page.getByRole('dialog', { name: /Reschedule · 50 selected visits/ })
    await panel.waitFor()
    await expect.poll(() => page.evaluate(() => document.activeElement?.tagName)).toBe('SELECT')
    await page.keyboard.press('Tab')
    await expect.poll(() => page.evaluate(() => (document.activeElement as HTMLInputElement | null)?.value)).toBe('2')
    await page.keyboard.press('Enter')
    const preview = panel.getByRole('region', { name: 'Preview' })
    await preview.waitFor()
    expect(await preview.textContent()).toContain('Move 50 visits by 2 working days. 50 of 50 selected will change')
    const changes = preview.getByRole('table').first()
    expect(await changes.getByRole('row').count()).toBe(51)
    expect(await changes.getByRole('row').nth(1).textContent()).toContain('scheduledOn: 2026-06-16scheduledOn: 2026-06-18')
    expect(dates()).toEqual([{ d: '2026-06-16', n: 60 }])

    await expect.poll(() => page.evaluate(() => document.activeElement?.textContent)).toBe('Apply to 50')
    await page.keyboard.press('Enter')
    await panel.getByText(/Applied: Move 50 visits by 2 working days\. 50 changed\./).waitFor()
    expect(dates()).toEqual([
      { d: '2026-06-16', n: 10 },
      { d: '2026-06-18', n: 50 },
    ])

    await expect.poll(() => page.evaluate(() => document.activeElement?.textContent)).toBe('Undo')
    await page.keyboard.press('Enter')
    await panel.getByText('Undone: 50 records put back as they were.').waitFor()
    expect(dates()).toEqual([{ d: '2026-06-16', n: 60 }])

    await page.keyboard.press('Escape')
    await panel.waitFor({ state: 'hidden' })
    await context.close()
  })
})
