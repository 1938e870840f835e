import { readFile } from 'node:fs/promises'
import type { Page } from 'playwright-core'
import { describe, expect, it } from 'vitest'
import { DEMO_EMAIL, useSeededServer } from '#tests/setup/fixture'
import { sessionCookieFor, userIdByEmail } from '#tests/setup/sessions'
import { TEST_TODAY } from '#tests/setup/temp-db'

describe('acting on the detectors of selected sites and events, and exporting from the palette', () => {
  const t = useSeededServer('small', { browser: true })
  const sql = () => t.data.db.$client

  async function pageAs(email: string, path: string): Promise<Page> {
    const { cookie } = await sessionCookieFor(t.data.db, userIdByEmail(t.data.db, email))
    const context = await t.browser.newContext({ viewport: { width: 1440, height: 900 }, acceptDownloads: true })
    const [name, ...value] = cookie.split('=')
    await context.addCookies([{ name, value: value.join('='), domain: '127.0.0.1', path: '/' }])
    const page = await context.newPage()
    await page.goto(`${t.server.url}${path}`, { waitUntil: 'networkidle' })
    await page.getByRole('row').nth(1).getByRole('cell').nth(1).waitFor()
    return page
  }

  async function runFromPalette(page: Page, text: string, value: string) {
    await page.keyboard.press('Control+k')
    const palette = page.getByRole('dialog', { name: 'Command palette' })
    await palette.waitFor()
    await page.keyboard.type(text)
    await palette.locator(`[cmdk-item][data-value="${value}"][data-selected="true"]`).waitFor()
    await page.keyboard.press('Enter')
  }

  it('the office selects four sites from the keyboard, audits their detectors’ delays and books the corrections', async () => {
    sql().exec('delete from closed_days; delete from observed_holidays')
    const sites = sql().prepare('select id, name from sites order by name, id limit 4').all() as Array<{ id: number; name: string }>
    const inSites = `site_id in (${sites.map((s) => s.id).join(',')})`
    const detectors = (sql().prepare(`select count(*) n from detectors where ${inSites}`).get() as { n: number }).n
    const disagree = sql().prepare(`select site_id as siteId, count(*) n from detectors where ${inSites} and delay_agreement = 'disagree' group by site_id`).all() as Array<{ siteId: number; n: number }>
    expect(disagree.length).toBeGreaterThan(0)
    const visitsBefore = (sql().prepare('select max(id) m from visits').get() as { m: number }).m

    const page = await pageAs(DEMO_EMAIL.office, '/sites?dir=asc&sort=name')
    await page.keyboard.press('x')
    for (let i = 0; i < 3; i++) await page.keyboard.press('Shift+j')
    const bar = page.getByRole('region', { name: 'Change many at once' })
    await expect.poll(() => bar.textContent()).toContain('4 selected sites')
    expect(await bar.textContent()).toContain('Acts on the detectors at these sites')

    await runFromPalette(page, 'Delay audit', 'action:bulk:delay-audit')
    const panel = page.getByRole('dialog', { name: /Delay audit · 4 selected sites/ })
    await panel.waitFor()
    await expect.poll(() => page.evaluate(() => document.activeElement?.tagName)).toBe('SELECT')
    // From the first field, Tab to the day and Enter previews.
    await page.keyboard.press('Tab')
    await page.keyboard.press('Enter')
    const preview = panel.getByRole('region', { name: 'Preview' })
    await preview.waitFor()
    const text = await preview.textContent()
    expect(text).toContain(`The 4 sites stand for ${detectors} detectors.`)
    const total = disagree.reduce((n, d) => n + d.n, 0)
    expect(text).toContain(`Book ${disagree.length} correction visit${disagree.length === 1 ? '' : 's'} for ${total} disagreeing detector${total === 1 ? '' : 's'}, one per site`)
    expect(text).toMatch(/Of these detectors, \d+ agree with their site's delay policy, \d+ disagree and \d+ were never recorded\./)
    expect((sql().prepare('select max(id) m from visits').get() as { m: number }).m).toBe(visitsBefore)

    const apply = `Book ${disagree.length} visit${disagree.length === 1 ? '' : 's'}`
    await expect.poll(() => page.evaluate(() => document.activeElement?.textContent)).toBe(apply)
    await page.keyboard.press('Enter')
    await panel.getByText(/^Applied: Book /).waitFor()
    const made = sql()
      .prepare(`select v.site_id as siteId, v.kind, v.scheduled_on as d, count(*) n from visits v join visit_detectors vd on vd.visit_id = v.id where v.id > ? group by v.id order by v.site_id`)
      .all(visitsBefore) as Array<{ siteId: number; kind: string; d: string; n: number }>
    expect(made.map((m) => ({ siteId: m.siteId, n: m.n }))).toEqual([...disagree].sort((a, b) => a.siteId - b.siteId))
    expect(made.every((m) => m.kind === 'repair' && m.d > TEST_TODAY)).toBe(true)
    await page.context().close()
  })

  it("the lead acknowledges the detectors of two trouble events from the selection bar", async () => {
    const page = await pageAs(DEMO_EMAIL.lead, '/events?kind=trouble')
    // The first two rows, as the list route gives them; their detectors start unacknowledged.
    const api = (await (await page.request.get(`${t.server.url}/api/events?kind=trouble&limit=2`)).json()) as { rows: Array<{ id: number; detectorId: number }> }
    const events = api.rows
    expect(events.every((e) => e.detectorId !== null)).toBe(true)
    sql().prepare(`update detectors set acknowledged_at = null, acknowledged_by = null where id in (${events.map((e) => e.detectorId).join(',')})`).run()
    for (const index of [2, 3]) await page.locator(`[role=row][aria-rowindex="${index}"] input[type=checkbox]`).check()
    const bar = page.getByRole('region', { name: 'Change many at once' })
    await expect.poll(() => bar.textContent()).toContain('2 selected events')
    await bar.getByRole('button', { name: 'Acknowledge…' }).click()
    const panel = page.getByRole('dialog', { name: /Acknowledge · 2 selected events/ })
    await panel.getByRole('button', { name: 'Preview' }).click()
    const distinct = new Set(events.map((e) => e.detectorId)).size
    await panel.getByText(`The 2 events stand for ${distinct} detector${distinct === 1 ? '' : 's'}.`).waitFor()
    await panel.getByRole('button', { name: `Apply to ${distinct}` }).click()
    await panel.getByText(/^Applied: Acknowledge /).waitFor()
    const lead = userIdByEmail(t.data.db, DEMO_EMAIL.lead)
    for (const e of events) expect(sql().prepare('select acknowledged_by as by from detectors where id = ?').get(e.detectorId)).toEqual({ by: lead })
    await page.context().close()
  })

  it('exports the list under its filter and sort from the palette', async () => {
    const page = await pageAs(DEMO_EMAIL.office, '/sites?region=US-OR&region=US-WA&sort=city&dir=desc')
    const download = page.waitForEvent('download')
    await runFromPalette(page, 'Export this list', 'action:export-csv')
    const file = await download
    expect(file.suggestedFilename()).toBe(`ductkeeper-sites-${TEST_TODAY}.csv`)
    const lines = (await readFile((await file.path())!, 'utf8')).trim().split(/\r?\n/)
    const want = sql().prepare("select name from sites where region in ('US-OR', 'US-WA') order by city desc, id").all() as Array<{ name: string }>
    expect(lines.length).toBe(want.length + 1)
    for (const s of want) expect(lines.some((l) => l.includes(s.name))).toBe(true)
    await page.context().close()
  })
})
