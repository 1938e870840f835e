import type { Page } from 'playwright-core'
import { describe, expect, it } from 'vitest'
import { DEMO_EMAIL, useSeededServer } from '#tests/setup/fixture'
import { userIdByEmail } from '#tests/setup/sessions'
import { signInAs } from '#tests/setup/sign-in-browser'

describe('admin pages in Chromium', () => {
  const t = useSeededServer('small', { browser: true })

  async function adminPage(width: number) {
    const context = await t.browser.newContext({ viewport: { width, height: 844 } })
    await context.grantPermissions(['clipboard-read', 'clipboard-write'], { origin: t.server.url })
    const page = await context.newPage()
    await signInAs(page, t.server.url, DEMO_EMAIL.admin)
    return { page, close: () => context.close() }
  }
  const noSidewaysScroll = (page: Page) => page.evaluate(() => document.documentElement.scrollWidth <= window.innerWidth)
  const active = (email: string) => (t.data.db.$client.prepare('select active from users where email = ?').get(email) as { active: number }).active

  it('at phone width keeps Change and Deactivate on screen, and asks before deactivating', async () => {
    const { page, close } = await adminPage(390)
    await page.goto(`${t.server.url}/admin/users`)
    expect(await noSidewaysScroll(page)).toBe(true)
    const row = page.locator(`#user-${userIdByEmail(t.data.db, DEMO_EMAIL.manager)}`)
    for (const name of ['Change role of Helen Sato', 'Deactivate']) {
      const box = (await row.getByRole('button', { name }).boundingBox())!
      expect(box.x).toBeGreaterThanOrEqual(0)
      expect(box.x + box.width).toBeLessThanOrEqual(390)
    }

    await row.getByRole('button', { name: 'Deactivate' }).click()
    const dialog = page.getByRole('dialog', { name: 'Deactivate Helen Sato?' })
    await dialog.waitFor()
    await dialog.getByRole('button', { name: 'Keep active' }).click()
    await dialog.waitFor({ state: 'hidden' })
    expect(active(DEMO_EMAIL.manager)).toBe(1)

    await row.getByRole('button', { name: 'Deactivate' }).click()
    await dialog.getByRole('button', { name: 'Deactivate Helen Sato' }).click()
    await page.getByRole('status').filter({ hasText: 'Deactivated; their sessions and API tokens were revoked.' }).waitFor()
    expect(active(DEMO_EMAIL.manager)).toBe(0)
    await row.getByRole('button', { name: 'Reactivate' }).click()
    await page.getByRole('status').filter({ hasText: 'Reactivated.' }).waitFor()
    expect(active(DEMO_EMAIL.manager)).toBe(1)
    await close()
  })

  it('shows a refused region beside its field', async () => {
    const { page, close } = await adminPage(1440)
    await page.goto(`${t.server.url}/admin/users`)
    const coverage = page.getByRole('form', { name: 'Coverage of Tomas Reyna' })
    await page.locator(`#user-${userIdByEmail(t.data.db, DEMO_EMAIL.technician)} summary`).click()
    await coverage.getByLabel(/Regions/).fill('US-OR, Cascadia')
    await coverage.getByRole('button', { name: 'Save coverage' }).click()
    await page.getByText('CASCADIA is not a region code: use ISO 3166-2, like US-OR').waitFor()
    expect(await page.getByRole('form', { name: 'Coverage of Tomas Reyna' }).getByLabel(/Regions/).getAttribute('aria-invalid')).toBe('true')
    await close()
  })

  it('filters the audit log and clears every filter with Everything', async () => {
    const { page, close } = await adminPage(390)
    await page.goto(`${t.server.url}/admin/audit`)
    expect(await noSidewaysScroll(page)).toBe(true)
    // On a phone each kind of change is a finger-sized choice.
    const chips = await page.getByRole('navigation', { name: 'Kind of change' }).getByRole('link').evaluateAll((as) => as.map((a) => a.getBoundingClientRect().height))
    expect(chips.length).toBeGreaterThan(5)
    expect(Math.min(...chips)).toBeGreaterThanOrEqual(44)
    // The deactivation above reads as a sentence.
    await page.getByText('Ada Whitlock deactivated Helen Sato and ended their sessions and API tokens').waitFor()

    expect(await page.getByText('Ada Whitlock signed in').count()).toBe(0)
    await page.getByLabel('Show sign-ins').check()
    await page.waitForURL(/signins=1/)
    await page.getByText('Ada Whitlock signed in').first().waitFor()
    await page.getByRole('navigation', { name: 'Kind of change' }).getByRole('link', { name: 'People' }).click()
    await page.waitForURL(/kind=people/)
    await page.getByLabel('Person').selectOption({ label: 'Ada Whitlock' })
    await page.waitForURL(/actor=\d+/)
    const params = new URL(page.url()).searchParams
    expect([params.get('kind'), params.get('signins')]).toEqual(['people', '1'])
    await page.getByText('Ada Whitlock deactivated Helen Sato').waitFor()
    expect(await page.getByText('Ada Whitlock signed in').count()).toBe(0)

    await page.getByRole('link', { name: 'Everything' }).click()
    await page.waitForURL((u) => u.pathname === '/admin/audit' && u.search === '')
    // The address changes a moment before the page shows the new view: wait for the form to follow.
    await expect.poll(() => page.getByLabel('Person').inputValue()).toBe('')
    expect(await page.getByLabel('Show sign-ins').isChecked()).toBe(false)
    expect(await page.getByRole('link', { name: 'Everything' }).getAttribute('aria-current')).toBe('page')
    expect(await page.getByText('Ada Whitlock signed in').count()).toBe(0)
    await close()
  })

  it('the company calendar fits a phone with no date broken across lines', async () => {
    const { page, close } = await adminPage(390)
    await page.goto(`${t.server.url}/admin/calendar`)
    expect(await noSidewaysScroll(page)).toBe(true)
    // Every ISO date on the page, measured as laid out: one that wraps has more than one box.
    const dates = await page.evaluate(() => {
      const out: Array<{ date: string; lines: number }> = []
      const walk = document.createTreeWalker(document.querySelector('main')!, NodeFilter.SHOW_TEXT)
      for (let n = walk.nextNode(); n; n = walk.nextNode()) {
        for (const m of (n.textContent ?? '').matchAll(/\d{4}-\d{2}-\d{2}/g)) {
          const r = document.createRange()
          r.setStart(n, m.index)
          r.setEnd(n, m.index + m[0].length)
          const boxes = [...r.getClientRects()].filter((b) => b.width > 0)
          if (boxes.length) out.push({ date: m[0], lines: new Set(boxes.map((b) => Math.round(b.top))).size })
        }
      }
      return out
    })
    expect(dates.length).toBeGreaterThan(5)
    expect(dates.filter((d) => d.lines > 1)).toEqual([])
    const offs = await page.getByRole('button', { name: 'Take this day off' }).evaluateAll((bs) => bs.map((b) => b.getBoundingClientRect()).map((b) => ({ right: b.right, height: b.height })))
    for (const b of offs) expect(b.right).toBeLessThanOrEqual(390)
    await close()
  })

  it('copies a new API token and says it is shown once', async () => {
    const { page, close } = await adminPage(390)
    await page.goto(`${t.server.url}/admin/tokens`)
    await page.getByLabel('Name').fill('Label printer')
    await page.getByRole('button', { name: 'Create' }).click()
    await page.getByText('Shown once: copy it now').waitFor()
    const token = await page.getByLabel('Your new token').inputValue()
    expect(token).toMatch(/^dk_[0-9a-f]{8}_/)
    await page.getByRole('button', { name: 'Copy token' }).click()
    await page.getByRole('status').filter({ hasText: 'Copied to the clipboard.' }).waitFor()
    expect(await page.evaluate(() => navigator.clipboard.readText())).toBe(token)
    // The form is empty again for the next token.
    expect(await page.getByLabel('Name').inputValue()).toBe('')
    expect(await noSidewaysScroll(page)).toBe(true)
    await close()
  })
})
