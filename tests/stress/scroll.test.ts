import type { Browser, Page } from 'playwright-core'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { launchBrowser } from '#tests/setup/browser'
import { startServer } from '#tests/setup/server'
import { sessionCookieFor, userIdByEmail } from '#tests/setup/sessions'
import { seededDb } from '#tests/setup/temp-db'

// The stress scale: 101,000 detectors and about 2.1 million events.
describe('scrolling the fleet tables over the stress data', () => {
  let server: Awaited<ReturnType<typeof startServer>>
  let data: ReturnType<typeof seededDb>
  let browser: Browser
  let page: Page
  beforeAll(async () => {
    data = seededDb('stress')
    server = await startServer(data.path)
    browser = await launchBrowser()
    const { cookie } = await sessionCookieFor(data.db, userIdByEmail(data.db, 'lead@ductkeeper.test'))
    const context = await browser.newContext({ viewport: { width: 1366, height: 900 } })
    const [name, ...value] = cookie.split('=')
    await context.addCookies([{ name, value: value.join('='), domain: '127.0.0.1', path: '/' }])
    page = await context.newPage()
  }, 300_000)
  afterAll(async () => {
    await browser?.close()
    await server?.stop()
    data?.cleanup()
  })

  async function scrollThrough(path: string, expectedTotal: number) {
    await page.goto(`${server.url}${path}`, { waitUntil: 'networkidle' })
    const table = page.getByRole('table')
    await table.locator('[role=row][data-index="0"] [role=cell] a').first().waitFor()
    const scroller = table.locator('xpath=..')
    const rowCounts: number[] = []
    for (const fraction of [0, 0.25, 0.5, 0.75, 1]) {
      await scroller.evaluate((el, f) => {
        el.scrollTop = (el.scrollHeight - el.clientHeight) * f
      }, fraction)
      // Settle, then the window for this position loads.
      const last = fraction === 1 ? expectedTotal - 1 : null
      if (last !== null) await table.locator(`[role=row][data-index="${last}"] [role=cell] a`).first().waitFor({ timeout: 15_000 })
      else await page.waitForFunction(() => !document.querySelector('[role=row] [role=cell]')?.textContent?.includes('Loading…') && ![...document.querySelectorAll('[role=cell]')].some((c) => c.textContent === 'Loading…'), null, { timeout: 15_000 })
      rowCounts.push(await table.locator('[role=row]').count())
    }
    return rowCounts
  }

  it('keeps under 150 row elements in the DOM from top to bottom of 101,000 detectors', async () => {
    const total = (data.db.$client.prepare('select count(*) as n from detectors').get() as { n: number }).n
    expect(total).toBeGreaterThanOrEqual(100_000)
    const counts = await scrollThrough('/devices?sort=tag&dir=asc', total)
    for (const n of counts) expect(n).toBeLessThan(150)
    await page.getByRole('status').filter({ hasText: /101,000 detectors/ }).waitFor()
  })

  it('keeps under 150 row elements from top to bottom of 2 million events', async () => {
    const total = (data.db.$client.prepare("select rows as n from table_counts where name = 'events'").get() as { n: number }).n
    expect(total).toBeGreaterThanOrEqual(2_000_000)
    const counts = await scrollThrough('/events', total)
    for (const n of counts) expect(n).toBeLessThan(150)
  })
})
