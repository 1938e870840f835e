import { describe, expect, it } from 'vitest'
import { useSeededServer } from '#tests/setup/fixture'
import { sessionCookieFor, userIdByEmail } from '#tests/setup/sessions'

describe('delay-setting audit in the browser', () => {
  const t = useSeededServer('small', { browser: true })

  it('a lead runs the fleet-wide audit and creates correction visits, one per site', async () => {
    const q = t.data.db.$client
    q.exec('delete from closed_days; delete from observed_holidays')
    const count = (o: string) => (q.prepare('select count(*) as n from detectors where delay_agreement = ?').get(o) as { n: number }).n
    const visits = () => (q.prepare("select count(*) as n from visits where kind = 'repair' and status = 'planned'").get() as { n: number }).n
    const { cookie } = await sessionCookieFor(t.data.db, userIdByEmail(t.data.db, 'lead@ductkeeper.test'))
    const context = await t.browser.newContext({ viewport: { width: 1440, height: 900 } })
    const [name, ...value] = cookie.split('=')
    await context.addCookies([{ name, value: value.join('='), domain: '127.0.0.1', path: '/' }])
    const page = await context.newPage()
    await page.goto(`${t.server.url}/triage`, { waitUntil: 'networkidle' })
    await page.getByRole('link', { name: 'Delay audit' }).first().click()
    await page.getByRole('heading', { name: 'Delay-setting audit' }).waitFor()

    const counts = page.getByRole('region', { name: 'Counts per outcome' })
    for (const o of ['agree', 'disagree', 'unknown']) {
      expect((await counts.locator(`[data-outcome="${o}"] p`).nth(1).textContent())?.replace(/,/g, '')).toBe(String(count(o)))
    }
    expect(await counts.locator('[data-outcome="disagree"] a').first().getAttribute('href')).toBe('/devices?delay=disagree')
    expect(await page.getByRole('note').first().textContent()).toMatch(/per the device's instructions.*monitoring company.*never alter the fire alarm panel/)

    const before = visits()
    const act = page.getByRole('region', { name: /Act on all/ })
    await act.getByRole('button', { name: 'Preview correction visits' }).click()
    const preview = act.getByRole('region', { name: 'Preview' })
    await preview.waitFor()
    const summary = (await preview.locator('p').first().textContent()) ?? ''
    const m = /Book (\d+) correction visits? for (\d+) disagreeing detectors?, one per site/.exec(summary)
    expect(m, summary).not.toBeNull()
    const sites = Number(m![1])
    expect(sites).toBeGreaterThan(0)
    expect(visits()).toBe(before)
    await act.getByRole('button', { name: `Create ${sites} visit${sites === 1 ? '' : 's'}` }).click()
    await act.getByText(/Done: Book \d+ correction visits?/).waitFor()
    expect(visits()).toBe(before + sites)
    // One visit per site among those just made.
    const made = q.prepare("select site_id as s, count(*) as n from visits where kind = 'repair' and status = 'planned' and created_by = (select id from users where email = 'lead@ductkeeper.test') group by site_id").all() as Array<{ s: number; n: number }>
    expect(made.length).toBe(sites)
    expect(made.every((r) => r.n === 1)).toBe(true)
    await act.getByRole('button', { name: 'Undo' }).click()
    await act.getByText(/Undone:/).waitFor()
    expect(visits()).toBe(before)
    await context.close()
  })
})
