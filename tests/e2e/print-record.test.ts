import { join } from 'node:path'
import type { Page } from 'playwright-core'
import { getDocument } from 'pdfjs-dist/legacy/build/pdf.mjs'
import { describe, expect, it } from 'vitest'
import { DEMO_EMAIL, useSeededServer } from '#tests/setup/fixture'
import { signInAs } from '#tests/setup/sign-in-browser'

const fmt = (n: number, places: number) => Number(n.toFixed(places)).toLocaleString('en-US')
// pdf.js splits runs at punctuation and line ends; compare with the spacing taken out.
const squash = (s: string) => s.replace(/\s+/g, '')

/** Each page's text as pdf.js reads it from the printed file. */
async function pdfPages(bytes: Buffer): Promise<string[]> {
  const doc = await getDocument({ data: new Uint8Array(bytes), verbosity: 0, useSystemFonts: false }).promise
  const pages: string[] = []
  for (let i = 1; i <= doc.numPages; i++) {
    const content = await (await doc.getPage(i)).getTextContent()
    pages.push(content.items.map((it) => ('str' in it ? it.str + (it.hasEOL ? '\n' : ' ') : '')).join('').replace(/[ \t]+/g, ' '))
  }
  await doc.destroy()
  return pages
}

// Set PRINT_SHOTS_DIR to keep screenshots of the print view for a look by eye.
async function shot(page: Page, name: string) {
  const dir = process.env.PRINT_SHOTS_DIR
  if (dir) await page.screenshot({ path: join(dir, `${name}.png`), fullPage: true })
}

describe('printed records in Chromium', () => {
  const t = useSeededServer('small', { browser: true })
  const one = <T,>(sql: string, ...args: unknown[]) => t.data.db.$client.prepare(sql).get(...args) as T
  const all = <T,>(sql: string, ...args: unknown[]) => t.data.db.$client.prepare(sql).all(...args) as T[]

  it("a visit's record prints with its readings, its failure and the notice, and nothing of the console", async () => {
    const v = one<{ id: number; site: string }>(
      `select v.id, (select name from sites s where s.id = v.site_id) as site from visits v where v.status = 'done'
         and exists (select 1 from visit_detectors vd where vd.visit_id = v.id and vd.result = 'fail')
         and exists (select 1 from notifications n where n.visit_id = v.id)
       order by (select count(*) from readings r where r.visit_id = v.id) desc, v.id limit 1`,
    )
    const failed = one<{ detectorId: number; tag: string }>(
      "select d.id as detectorId, d.tag from visit_detectors vd join detectors d on d.id = vd.detector_id where vd.visit_id = ? and vd.result = 'fail' limit 1",
      v.id,
    )
    const reason = 'Alarm contact reads open at the panel; fire alarm contractor called'
    t.data.db.$client.prepare('update visit_detectors set result_reason = ? where visit_id = ? and detector_id = ?').run(reason, v.id, failed.detectorId)
    const loop = all<{ value: number }>("select value from readings where visit_id = ? and kind like 'loop-%' and open = 0 order by id limit 3", v.id)
    const pressure = one<{ value: number }>("select value from readings where visit_id = ? and kind = 'pressure' order by id limit 1", v.id)
    const notice = one<{ confirmation: string }>('select confirmation from notifications where visit_id = ?', v.id)
    expect(loop.length).toBeGreaterThan(0)
    // Who read the loop at the panel, as the visit form records it with the readings.
    const readBy = 'Ines Varga, Northpoint Alarm Co.'
    t.data.db.$client
      .prepare("update visit_detectors set findings = json_set(coalesce(findings, '{}'), '$.loopReadBy', ?) where visit_id = ? and detector_id in (select detector_id from readings where visit_id = ? and kind like 'loop-%')")
      .run(readBy, v.id, v.id)

    const context = await t.browser.newContext({ viewport: { width: 816, height: 1056 } })
    const page = await context.newPage()
    await signInAs(page, t.server.url, DEMO_EMAIL.office, `/visits/${v.id}/record`)
    await page.waitForURL(new RegExp(`/visits/${v.id}/record$`))
    await expect(page.getByRole('button', { name: 'Print' }).isVisible()).resolves.toBe(true)
    await shot(page, 'visit-record-screen')

    await page.emulateMedia({ media: 'print' })
    await shot(page, 'visit-record')
    // On paper: no rail, no print button, no breadcrumb.
    await expect(page.getByRole('navigation', { name: 'Sections' }).isVisible()).resolves.toBe(false)
    await expect(page.getByRole('button', { name: 'Print' }).isVisible()).resolves.toBe(false)
    const printed = await page.locator('main').innerText()
    expect(printed).toContain(reason)
    expect(printed).toContain(notice.confirmation)

    const pdf = await page.pdf({ format: 'Letter', printBackground: true })
    const pages = await pdfPages(pdf)
    const text = squash(pages.join('\n'))
    const has = (s: string) => expect(text).toContain(squash(s))
    expect(text).not.toContain('Signout')
    expect(text).not.toContain('Findorjump')
    for (const r of loop) has(`${fmt(r.value, 1)} Ω`)
    has(`Loop read at the panel by ${readBy}`)
    has(`${fmt(pressure.value, 3)} in. w.c.`)
    has(failed.tag)
    has(reason)
    has('Failed')
    has(notice.confirmation)
    has('Site representative')
    has('NFPA 72')
    // Page numbers in the bottom margin, counted against the pages pdf.js found.
    expect(squash(pages[0])).toContain(`Page1of${pages.length}`)
    // Every page names the property and the visit's day, so a loose page still says whose it is.
    for (const p of pages) expect(squash(p)).toContain(squash(v.site))
    await context.close()
  })

  it("a site's record for a period starts each visit on a new page", async () => {
    const s = one<{ siteId: number }>("select site_id as siteId from visits where status = 'done' group by site_id order by count(*) desc, site_id limit 1")
    const visits = all<{ id: number; scheduledOn: string }>(
      "select id, scheduled_on as scheduledOn from visits where site_id = ? and status = 'done' and scheduled_on between '2024-06-15' and '2026-06-15' order by scheduled_on, id",
      s.siteId,
    )
    expect(visits.length).toBeGreaterThan(1)
    const context = await t.browser.newContext({ viewport: { width: 816, height: 1056 } })
    const page = await context.newPage()
    await signInAs(page, t.server.url, DEMO_EMAIL.lead, `/sites/${s.siteId}/record?from=2024-06-15&to=2026-06-15`)
    await page.emulateMedia({ media: 'print' })
    await shot(page, 'site-record')
    const pages = await pdfPages(await page.pdf({ format: 'Letter', printBackground: true }))
    // The summary, then each visit on pages of its own: no page holds two visits' titles.
    const title = 'Ductsmokedetectorinspectionandtestrecord'
    const titles = pages.map((p) => squash(p).split(title).length - 1)
    expect(titles.filter((n) => n === 1)).toHaveLength(visits.length)
    expect(Math.max(...titles)).toBe(1)
    expect(titles[0]).toBe(0)
    expect(squash(pages[0])).toContain('Ductsmokedetectorrecords')
    await context.close()
  })

  it('the label sheet prints 3 × 8 labels a page with one QR code each', async () => {
    const s = one<{ siteId: number; n: number }>('select site_id as siteId, count(*) as n from detectors group by site_id order by n desc, site_id limit 1')
    const context = await t.browser.newContext()
    const page = await context.newPage()
    await signInAs(page, t.server.url, DEMO_EMAIL.technician, `/sites/${s.siteId}/labels`)
    await page.emulateMedia({ media: 'print' })
    await shot(page, 'labels')
    await expect(page.locator('.label-qr svg').count()).resolves.toBe(s.n)
    const box = await page.locator('.label').first().boundingBox()
    // 63.5 × 33 mm at 96 px to the inch.
    expect(Math.round(box!.width)).toBe(240)
    expect(Math.round(box!.height)).toBe(125)
    const pages = await pdfPages(await page.pdf({ format: 'Letter' }))
    expect(pages).toHaveLength(Math.ceil(s.n / 24))
    await context.close()
  })
})
