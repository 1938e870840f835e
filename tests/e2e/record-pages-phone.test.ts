import type { Page } from 'playwright-core'
import { describe, expect, it } from 'vitest'
import { DEMO_EMAIL, useSeededServer } from '#tests/setup/fixture'
import { sessionCookieFor, userIdByEmail } from '#tests/setup/sessions'

const PHONE = { width: 390, height: 844 }
const DESK = { width: 1440, height: 900 }

// The record pages a technician opens from a label on the unit, measured in Chromium at a phone's width.
describe('record pages on a phone', () => {
  const t = useSeededServer('small', { browser: true })
  const sql = () => t.data.db.$client

  async function open(path: string, viewport = PHONE): Promise<Page> {
    const { cookie } = await sessionCookieFor(t.data.db, userIdByEmail(t.data.db, DEMO_EMAIL.technician))
    const phone = viewport.width < 600
    const context = await t.browser.newContext({ viewport, isMobile: phone, hasTouch: phone })
    const [name, ...value] = cookie.split('=')
    await context.addCookies([{ name, value: value.join('='), domain: '127.0.0.1', path: '/' }])
    const page = await context.newPage()
    await page.goto(`${t.server.url}${path}`, { waitUntil: 'networkidle' })
    return page
  }

  /** How far the page reaches past the screen, and every element outside a sideways-scrolling box that does. */
  const overflow = (page: Page) =>
    page.evaluate(() => {
      const width = document.documentElement.clientWidth
      const past = [...document.querySelectorAll('body *')]
        .filter((e) => !e.closest('[data-scroll-x]') && e.getBoundingClientRect().width > 0 && e.getBoundingClientRect().right > width + 0.5)
        .map((e) => `${e.tagName.toLowerCase()} ${e.textContent?.trim().slice(0, 40)}`)
      return { scrollWidth: document.documentElement.scrollWidth, width, past: past.slice(0, 5) }
    })

  /** The drawing's labels as rendered: computed size times the drawing's scale on screen. */
  const drawingLabels = (page: Page) =>
    page.evaluate(() => {
      const texts = [...document.querySelectorAll<SVGTextElement>('figure svg[role=img] text')]
      const sizes = texts.map((x) => parseFloat(getComputedStyle(x).fontSize) * (x.ownerSVGElement?.getScreenCTM()?.a ?? 0))
      const box = document.querySelector<HTMLElement>('figure [data-scroll-x]')
      const hint = document.querySelector<HTMLElement>('figure [data-scroll-hint]')
      const body = parseFloat(getComputedStyle(document.querySelector('main p') ?? document.body).fontSize)
      return {
        count: texts.length,
        smallest: Math.min(...sizes),
        body,
        scrolls: box ? box.scrollWidth > box.clientWidth : null,
        hintShown: hint ? hint.offsetParent !== null : null,
      }
    })

  it('detector pages fit a phone in every recorded arrangement, with drawing labels no smaller than the text', async () => {
    const ids = (
      sql()
        .prepare('select min(id) as id from detectors group by eol_placement, alarm_terminal, supervisory_terminal order by 1')
        .all() as Array<{ id: number }>
    ).map((r) => r.id)
    expect(ids.length).toBeGreaterThanOrEqual(3)
    for (const id of ids) {
      const page = await open(`/devices/${id}`)
      const o = await overflow(page)
      expect(o.scrollWidth, `detector ${id}`).toBeLessThanOrEqual(PHONE.width)
      expect(o.past, `detector ${id}`).toEqual([])
      const labels = await drawingLabels(page)
      expect(labels.count).toBeGreaterThan(20)
      expect(labels.smallest, `detector ${id}`).toBeGreaterThanOrEqual(11)
      expect(labels.smallest).toBeGreaterThanOrEqual(labels.body)
      // The drawing keeps its size and scrolls in its own box, and says so.
      expect(labels.scrolls).toBe(true)
      expect(labels.hintShown).toBe(true)
      await page.context().close()
    }
  })

  it('puts state, due dates, expected readings, the notice and the open visit first on a phone', async () => {
    const { id } = sql()
      .prepare(
        `select vd.detector_id as id from visit_detectors vd join visits v on v.id = vd.visit_id
         join sites s on s.id = v.site_id where v.status in ('planned', 'notified', 'in-progress') and s.monitoring_company_id is not null
         order by vd.detector_id limit 1`,
      )
      .get() as { id: number }
    const terms = sql()
      .prepare(
        `select m.phone, m.notify_lead_minutes as lead, s.monitoring_account as account from detectors d join sites s on s.id = d.site_id
         join monitoring_companies m on m.id = s.monitoring_company_id where d.id = ?`,
      )
      .get(id) as { phone: string; lead: number; account: string | null }
    const visitIds = (
      sql()
        .prepare("select v.id from visit_detectors vd join visits v on v.id = vd.visit_id where vd.detector_id = ? and v.status in ('planned', 'notified', 'in-progress')")
        .all(id) as Array<{ id: number }>
    ).map((v) => v.id)
    const page = await open(`/devices/${id}`)
    const tops = await page.evaluate(() => {
      const top = (e: Element) => e.getBoundingClientRect().top + window.scrollY
      const first = Object.fromEntries([...document.querySelectorAll('[data-first]')].map((e) => [e.getAttribute('data-first'), top(e)]))
      const firstEls = [...document.querySelectorAll('[data-first]')]
      const rest = [...document.querySelectorAll('main section, main aside')]
        .filter((e) => !firstEls.some((f) => f === e || f.contains(e) || e.contains(f)))
        .map((e) => top(e))
      return { first, restTop: Math.min(...rest) }
    })
    const order = ['state', 'due', 'expected', 'notify', 'visit']
    expect(Object.keys(tops.first).sort()).toEqual([...order].sort())
    for (let i = 1; i < order.length; i++) expect(tops.first[order[i]], order[i]).toBeGreaterThan(tops.first[order[i - 1]])
    expect(tops.restTop).toBeGreaterThan(tops.first.visit)

    const notify = page.locator('[data-first=notify]')
    const tel = notify.locator(`a[href="tel:${terms.phone}"]`)
    await expect(tel.count()).resolves.toBe(1)
    expect((await tel.boundingBox())?.height).toBeGreaterThanOrEqual(44)
    const said = await notify.innerText()
    expect(said).toContain(`at least ${terms.lead} minutes`)
    if (terms.account) expect(said).toContain(terms.account)
    const visitLinks = page.locator('[data-first=visit] a[href^="/visits/"]')
    await expect(visitLinks.evaluateAll((as) => as.map((a) => a.getAttribute('href')))).resolves.toEqual(visitIds.map((v) => `/visits/${v}`))
    for (const box of await visitLinks.evaluateAll((as) => as.map((a) => a.getBoundingClientRect().height))) expect(box).toBeGreaterThanOrEqual(44)
    // Each state's expected reading is on the phone, in the order of the states.
    await expect(page.locator('[data-first=expected] li[data-state]').evaluateAll((li) => li.map((l) => l.getAttribute('data-state')))).resolves.toEqual([
      'normal',
      'alarm',
      'trouble',
      'unpowered',
    ])
    await page.context().close()
  })

  it('unit, site and customer pages fit a phone', async () => {
    const { unitId, siteId, customerId } = sql()
      .prepare(
        `select d.unit_id as unitId, d.site_id as siteId, d.customer_id as customerId from detectors d
         group by d.site_id order by count(*) desc, d.site_id limit 1`,
      )
      .get() as { unitId: number; siteId: number; customerId: number }
    for (const path of [`/units/${unitId}`, `/sites/${siteId}`, `/customers/${customerId}`]) {
      const page = await open(path)
      const o = await overflow(page)
      expect(o.scrollWidth, path).toBeLessThanOrEqual(PHONE.width)
      expect(o.past, path).toEqual([])
      // Telephone links are big enough for a thumb.
      for (const h of await page.locator('main a[href^="tel:"]').evaluateAll((as) => as.map((a) => a.getBoundingClientRect().height)))
        expect(h, `${path} tel link`).toBeGreaterThanOrEqual(44)
      await page.context().close()
    }
  })

  /** Where each breadcrumb link sits on the page, with where it leads. */
  const crumbs = (page: Page) =>
    page.locator('nav[aria-label=Breadcrumb] a').evaluateAll((as) =>
      as.map((a) => {
        const b = a.getBoundingClientRect()
        return { href: a.getAttribute('href'), top: Math.round(b.top), bottom: Math.round(b.bottom), height: b.height, right: b.right }
      }),
    )

  it('the breadcrumb is a stack of finger-sized rows on a phone, one record to a row with no gap between them, and one line on a desk', async () => {
    const d = sql().prepare('select id, unit_id as unitId, site_id as siteId, customer_id as customerId from detectors order by id limit 1').get() as Record<string, number>
    const visit = sql().prepare("select id from visits where status = 'done' order by id limit 1").get() as { id: number }
    const customerOfVisit = (sql().prepare('select s.customer_id as id from visits v join sites s on s.id = v.site_id where v.id = ?').get(visit.id) as { id: number }).id
    const expected: Array<[string, string[]]> = [
      [`/devices/${d.id}`, [`/customers/${d.customerId}`, `/sites/${d.siteId}`, `/units/${d.unitId}`]],
      [`/units/${d.unitId}`, [`/customers/${d.customerId}`, `/sites/${d.siteId}`]],
      [`/visits/${visit.id}`, ['/visits', `/customers/${customerOfVisit}`]],
    ]
    for (const [path, hrefs] of expected) {
      const phone = await open(path)
      const rows = await crumbs(phone)
      expect(rows.map((r) => r.href), path).toEqual(hrefs)
      for (const r of rows) {
        expect(r.height, `${path} ${r.href}`).toBeGreaterThanOrEqual(44)
        expect(r.right, `${path} ${r.href}`).toBeLessThanOrEqual(PHONE.width)
      }
      // Each record starts its own row right under the one before: no two on one line, no empty band between.
      for (let i = 1; i < rows.length; i++) expect(rows[i].top - rows[i - 1].bottom, `${path} row ${i}`).toBe(0)
      await phone.context().close()

      const desk = await open(path, DESK)
      const line = await crumbs(desk)
      expect(new Set(line.map((r) => r.top)).size, `${path} on a desk`).toBe(1)
      await desk.context().close()
    }
  })

  it("a visit's printed record reads on a phone: each detector's head in lines that do not overlap, times in the site's zone", async () => {
    const v = sql()
      .prepare(
        `select v.id, s.time_zone as tz from visits v join sites s on s.id = v.site_id where v.status = 'done'
           and exists (select 1 from notifications n where n.visit_id = v.id) order by v.id limit 1`,
      )
      .get() as { id: number; tz: string }
    const page = await open(`/visits/${v.id}/record`)
    const o = await overflow(page)
    expect(o.scrollWidth).toBeLessThanOrEqual(PHONE.width)
    const overlaps = await page.locator('.record-detector-head').evaluateAll((heads) =>
      heads.flatMap((h) => {
        const parts = [...h.children].map((c) => ({ text: c.textContent, b: c.getBoundingClientRect() }))
        const out: string[] = []
        for (const [i, a] of parts.entries())
          for (const c of parts.slice(i + 1))
            if (a.b.left < c.b.right - 0.5 && c.b.left < a.b.right - 0.5 && a.b.top < c.b.bottom - 0.5 && c.b.top < a.b.bottom - 0.5) out.push(`${a.text} over ${c.text}`)
        // A part squeezed to a sliver wraps a letter or two to a line.
        for (const p of parts) if (p.b.width < 40) out.push(`${p.text} is ${p.b.width} px wide`)
        return out
      }),
    )
    expect(overlaps.length).toBe(0)
    await expect(page.locator('.record-detector-head').count()).resolves.toBeGreaterThan(0)
    // The notice's times carry the zone's usual letters for the site, as the detector page does.
    const letters = new Intl.DateTimeFormat('en-US', { timeZone: v.tz, timeZoneName: 'short' }).formatToParts(new Date('2026-01-15T12:00:00Z')).find((p) => p.type === 'timeZoneName')!.value
    const summer = new Intl.DateTimeFormat('en-US', { timeZone: v.tz, timeZoneName: 'short' }).formatToParts(new Date('2026-07-15T12:00:00Z')).find((p) => p.type === 'timeZoneName')!.value
    const text = await page.locator('main').innerText()
    expect(text).not.toMatch(/GMT[+-]\d/)
    expect(text.includes(` ${letters}`) || text.includes(` ${summer}`)).toBe(true)
    await page.context().close()
  })

  it("every figure on a customer's page opens the list it counts", async () => {
    const { id } = sql().prepare('select customer_id as id from detectors group by customer_id order by count(*) desc limit 1').get() as { id: number }
    const count = (where: string) => (sql().prepare(`select count(*) as n from detectors where customer_id = ? ${where}`).get(id) as { n: number }).n
    const expected: Record<string, [string, number]> = {
      Sites: [`/sites?customer=${id}`, (sql().prepare('select count(*) as n from sites where customer_id = ?').get(id) as { n: number }).n],
      // No fleet list of units: the sites list counts each site's units.
      Units: [`/sites?customer=${id}`, (sql().prepare('select count(*) as n from units u join sites s on s.id = u.site_id where s.customer_id = ?').get(id) as { n: number }).n],
      Detectors: [`/devices?customer=${id}`, count('')],
      Overdue: [`/devices?customer=${id}&due=overdue`, count("and due_status = 'overdue'")],
      'Due within 30 days': [`/devices?customer=${id}&due=due-soon`, count("and due_status = 'due-soon'")],
      'In trouble': [`/devices?customer=${id}&state=trouble`, count("and state = 'trouble'")],
      'Out of service': [`/devices?customer=${id}&state=out-of-service`, count("and state = 'out-of-service'")],
      'Delay differs from policy': [`/devices?customer=${id}&delay=disagree`, count("and delay_agreement = 'disagree'")],
    }
    const page = await open(`/customers/${id}`)
    const figures = await page.locator('section[aria-label=Totals] > *').evaluateAll((els) =>
      els.map((e) => ({ tag: e.tagName, href: e.getAttribute('href'), label: e.firstElementChild?.textContent, value: e.children[1]?.textContent })),
    )
    expect(figures.map((f) => f.label)).toEqual(Object.keys(expected))
    for (const f of figures) {
      const [href, n] = expected[f.label!]
      expect(f.tag, f.label!).toBe('A')
      expect(f.href, f.label!).toBe(href)
      expect(f.value, f.label!).toBe(n.toLocaleString('en-US'))
    }
    // The list behind a figure holds as many as the figure says.
    const [href, n] = expected.Overdue
    await page.locator(`section[aria-label=Totals] a[href="${href}"]`).click()
    await page.waitForURL((u) => u.pathname + u.search === href)
    await expect.poll(() => page.getByRole('status').filter({ hasText: /detectors?$/ }).first().innerText()).toBe(`${n.toLocaleString('en-US')} ${n === 1 ? 'detector' : 'detectors'}`)
    await page.context().close()

    // The overview's tiles likewise: each one opens a list.
    const overview = await open('/overview')
    const tiles = await overview.locator('section[aria-label=Fleet] > *').evaluateAll((els) =>
      els.map((e) => [e.querySelector('span')?.textContent, e.querySelector('a')?.getAttribute('href') ?? null]),
    )
    expect(tiles.length).toBe(6)
    for (const [label, href] of tiles) expect(href, label ?? '').toMatch(/^\/(customers|sites|devices)\b/)
    await overview.context().close()
  })

  it('on a desk the drawing fits whole, unscaled, with no hint to scroll', async () => {
    const page = await open('/devices/1', DESK)
    const labels = await drawingLabels(page)
    expect(labels.scrolls).toBe(false)
    expect(labels.hintShown).toBe(false)
    expect(labels.smallest).toBeGreaterThanOrEqual(13)
    expect((await overflow(page)).scrollWidth).toBeLessThanOrEqual(DESK.width)
    await page.context().close()
  })
})
