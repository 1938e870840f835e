import { mkdirSync } from 'node:fs'
import { join } from 'node:path'
import type { Page } from 'playwright-core'
import { describe, expect, it } from 'vitest'
import { DEMO_EMAIL, useSeededServer } from '#tests/setup/fixture'
import { signInAs } from '#tests/setup/sign-in-browser'

// Set DK_SCREENSHOTS to a folder to keep a picture of each step at both widths.
const shots = process.env.DK_SCREENSHOTS
if (shots) mkdirSync(shots, { recursive: true })
const snap = (page: Page, name: string) => (shots ? page.screenshot({ path: join(shots, `${name}.png`), fullPage: true }) : Promise.resolve())

describe('the import screen', () => {
  const t = useSeededServer('small', { browser: true })

  for (const [width, height, name] of [
    [390, 844, 'phone'],
    [1440, 900, 'desk'],
  ] as const) {
    it(`maps, checks and writes an event file at ${width} px, reporting the bad row first`, async () => {
      const db = t.data.db.$client
      const site = db.prepare('select s.monitoring_account as account, d.tag from sites s join detectors d on d.site_id = s.id where s.monitoring_account is not null order by s.id limit 1').get() as {
        account: string
        tag: string
      }
      const file = [
        'Account,Zone,Event Time,Signal,Comment',
        `${site.account},${site.tag},2026-05-0${width === 390 ? 1 : 2} 07:30,trouble,Dirty chamber (${name})`,
        `${site.account},${site.tag},2026-05-0${width === 390 ? 1 : 2} 08:10,restore,Cleared (${name})`,
        `${site.account},NOPE-1,2026-05-03 09:00,alarm,`,
      ].join('\n')
      const before = (db.prepare('select count(*) as n from events').get() as { n: number }).n

      const context = await t.browser.newContext({ viewport: { width, height }, ...(width === 390 ? { isMobile: true, hasTouch: true } : {}) })
      const page = await context.newPage()
      await signInAs(page, t.server.url, DEMO_EMAIL.office, '/import')
      await page.getByLabel('Event history').check()
      await page.getByLabel(/^Source/).fill(`Harborview Central Station ${name}`)
      await page.getByLabel(/^CSV file/).setInputFiles({ name: 'signals.csv', mimeType: 'text/csv', buffer: Buffer.from(file) })
      await snap(page, `import-1-choose-${width}`)
      await page.getByRole('button', { name: 'Upload and map columns' }).click()

      await expect.poll(() => page.getByLabel(/^Detector tag/).inputValue()).toBe('Zone')
      expect(await page.getByLabel(/^Time/).inputValue()).toBe('Event Time')
      expect(await page.getByLabel(/^Kind/).inputValue()).toBe('Signal')
      await snap(page, `import-2-map-${width}`)
      await page.getByRole('button', { name: 'Check the file' }).click()

      const problems = page.getByRole('table', { name: /Problems/ })
      await problems.waitFor()
      expect(await problems.getByRole('row').nth(1).innerText()).toMatch(/4\s+Zone\s+NOPE-1\s+No detector with this tag/)
      expect((db.prepare('select count(*) as n from events').get() as { n: number }).n).toBe(before)
      await snap(page, `import-3-review-${width}`)

      await page.getByRole('button', { name: 'Write 2 rows' }).click()
      await page.getByText('Imported signals.csv').waitFor()
      expect((db.prepare('select count(*) as n from events').get() as { n: number }).n).toBe(before + 2)
      await snap(page, `import-4-done-${width}`)
      // Nothing on the page is wider than the screen.
      expect(await page.evaluate(() => document.documentElement.scrollWidth)).toBeLessThanOrEqual(width)
      await context.close()
    })
  }
})
