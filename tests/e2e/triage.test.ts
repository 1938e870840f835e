import type { Page } from 'playwright-core'
import { describe, expect, it } from 'vitest'
import { bookingPlan } from '~/.server/repos/triage-booking'
import { DEMO_EMAIL, useSeededServer } from '#tests/setup/fixture'
import { sessionCookieFor, userIdByEmail } from '#tests/setup/sessions'
import { TEST_TODAY } from '#tests/setup/temp-db'

describe('triage in Chromium', () => {
  const t = useSeededServer('small', { browser: true })
  const sql = () => t.data.db.$client

  async function signedInPage(size: { width: number; height: number }, phone = false): Promise<Page> {
    const { cookie } = await sessionCookieFor(t.data.db, userIdByEmail(t.data.db, DEMO_EMAIL.lead))
    const context = await t.browser.newContext({ viewport: size, hasTouch: phone, isMobile: phone })
    const [name, ...value] = cookie.split('=')
    await context.addCookies([{ name, value: value.join('='), domain: '127.0.0.1', path: '/' }])
    const page = await context.newPage()
    await page.addInitScript(() => {
      ;(window as unknown as { __pointer: number }).__pointer = 0
      for (const type of ['mousedown', 'pointerdown', 'mouseup', 'contextmenu']) {
        window.addEventListener(type, () => ((window as unknown as { __pointer: number }).__pointer += 1), true)
      }
    })
    await page.goto(`${t.server.url}/triage`, { waitUntil: 'networkidle' })
    await page.getByRole('status').filter({ hasText: 'detectors in the queue' }).waitFor()
    await page.locator('[data-slot=reasons]').first().waitFor()
    return page
  }
  const tableTop = async (page: Page) => (await page.getByRole('table', { name: 'detectors in the queue' }).boundingBox())!.y

  /** Every reasons block on screen shows all of its text: nothing cut at the side or the foot. */
  const clipped = (page: Page) =>
    page.evaluate(() =>
      [...document.querySelectorAll<HTMLElement>('[data-slot=reasons]')]
        .filter((el) => {
          const cell = el.closest<HTMLElement>('[role=cell]')!
          const row = el.closest<HTMLElement>('[role=row]')!
          const box = el.getBoundingClientRect()
          return el.scrollWidth > el.clientWidth + 1 || box.bottom > row.getBoundingClientRect().bottom + 1 || box.right > cell.getBoundingClientRect().right + 1
        })
        .map((el) => el.textContent),
    )

  it('shows every reason in full and keeps the table still when a row is selected, at desk and phone width', async () => {
    const desk = await signedInPage({ width: 1440, height: 900 })
    const top = sql().prepare("select id, risk_reasons as r from detectors where risk_reasons != '' and acknowledged_at is null order by risk_score desc, id desc limit 1").get() as { id: number; r: string }
    // The worst detector carries several reasons; each one's words are in its row.
    const api = await (await desk.request.get(`${t.server.url}/api/triage?limit=1`)).json()
    expect(api.rows[0].id).toBe(top.id)
    expect(api.rows[0].reasons.length).toBeGreaterThan(1)
    const firstRow = desk.locator('[role=row][aria-rowindex="2"]')
    for (const r of api.rows[0].reasons as Array<{ text: string }>) await expect(firstRow.innerText()).resolves.toContain(r.text)
    await expect(clipped(desk)).resolves.toEqual([])

    const before = await tableTop(desk)
    await desk.keyboard.press('x')
    await expect(desk.locator('[role=row][aria-selected=true]').count()).resolves.toBe(1)
    await desk.getByRole('region', { name: 'Act on the selection' }).getByText('1 selected').waitFor()
    expect((await tableTop(desk)) - before).toBe(0)
    await desk.context().close()

    const phone = await signedInPage({ width: 390, height: 844 }, true)
    await expect(clipped(phone)).resolves.toEqual([])
    const phoneBefore = await tableTop(phone)
    await phone.locator('[role=row][aria-rowindex="2"] input[type=checkbox]').check()
    await phone.getByRole('region', { name: 'Act on the selection' }).getByText('1 selected').waitFor()
    expect((await tableTop(phone)) - phoneBefore).toBe(0)
    await phone.context().close()
  })

  it('reads site names in full at desk width, the longest in the queue included', async () => {
    const desk = await signedInPage({ width: 1440, height: 900 })
    const uncut = (page: Page) =>
      page.evaluate(() => {
        const heads = [...document.querySelectorAll('[role=columnheader]')].map((h) => h.textContent ?? '')
        const at = heads.findIndex((h) => h.startsWith('Site'))
        return [...document.querySelectorAll('[role=row][data-index]')].map((row) => {
          const cell = row.querySelectorAll<HTMLElement>('[role=cell]')[at]
          const link = cell.querySelector<HTMLElement>('a')!
          const cut = [cell, ...cell.querySelectorAll<HTMLElement>('*')].some((el) => el.scrollWidth > el.clientWidth + 1 || (el !== cell && el.getBoundingClientRect().bottom > row.getBoundingClientRect().bottom + 1))
          return { site: link.textContent, cut }
        })
      })
    const shown = await uncut(desk)
    expect(shown.length).toBeGreaterThan(5)
    expect(shown.filter((s) => s.cut)).toEqual([])

    // The longest site name among the open queue, found by its own words.
    const longest = sql().prepare("select s.name from detectors d join sites s on s.id = d.site_id where d.risk_reasons != '' and d.acknowledged_at is null order by length(s.name) desc limit 1").get() as { name: string }
    await desk.goto(`${t.server.url}/triage?q=${encodeURIComponent(longest.name)}`, { waitUntil: 'networkidle' })
    await expect.poll(async () => (await uncut(desk)).filter((s) => s.site === longest.name)).toEqual([{ site: longest.name, cut: false }])
    await desk.context().close()
  })

  it('books from the palette by keyboard: usual technician and next working day filled in, Esc closes, Enter books, the open visit shown next time', async () => {
    const page = await signedInPage({ width: 1440, height: 900 })
    const first = sql().prepare("select id, tag, site_id as siteId from detectors where risk_reasons != '' and acknowledged_at is null order by risk_score desc, id desc limit 1").get() as { id: number; tag: string; siteId: number }
    // Whichever detector the ranking puts first starts with no open visit, so there is one to book.
    sql()
      .prepare("update visits set status = 'cancelled' where status in ('planned', 'notified', 'in-progress') and id in (select visit_id from visit_detectors where detector_id = ?)")
      .run(first.id)
    const site = bookingPlan(t.data.db, [first.id], 'test', TEST_TODAY).sites[0]
    expect(site.openVisits).toEqual([])
    expect(site.usual).not.toBeNull()
    const dialog = page.getByRole('dialog', { name: /^Book a visit for 1 detector/ })

    const openBooking = async () => {
      await page.keyboard.press('Control+k')
      const palette = page.getByRole('dialog', { name: 'Command palette' })
      await palette.waitFor()
      await page.keyboard.type('Book a visit')
      await palette.locator('[cmdk-item][data-value="action:schedule"][data-selected="true"]').waitFor()
      await page.keyboard.press('Enter')
      await dialog.waitFor()
    }

    await page.keyboard.press('x')
    await openBooking()
    // Focus lands on the first site's technician, which holds the site's usual one; the day is the next working day.
    await page.waitForFunction(() => document.activeElement?.tagName === 'SELECT' && !!document.activeElement.closest('dialog'))
    await expect(page.evaluate(() => (document.activeElement as HTMLSelectElement).value)).resolves.toBe(String(site.usual!.id))
    await expect(dialog.getByText(`Usual here: ${site.usual!.name}, ${site.usual!.visits} of the last ${site.usual!.of} visits.`).count()).resolves.toBe(1)
    await expect(dialog.getByLabel('Day').inputValue()).resolves.toBe('2026-06-16')
    await expect(dialog.getByText('Tuesday, the next working day.').count()).resolves.toBe(1)

    // Esc closes and leaves the selection as it was.
    await page.keyboard.press('Escape')
    await expect(dialog.count()).resolves.toBe(0)
    await expect(page.locator('[role=row][aria-selected=true]').count()).resolves.toBe(1)

    await openBooking()
    await page.waitForFunction(() => document.activeElement?.tagName === 'SELECT' && !!document.activeElement.closest('dialog'))
    const visitsBefore = (sql().prepare('select count(*) as n from visits').get() as { n: number }).n
    await page.keyboard.press('Enter')
    await page.getByRole('status').filter({ hasText: 'Booked 1 visit on 2026-06-16 for 1 detector.' }).waitFor()
    await expect(dialog.count()).resolves.toBe(0)
    expect((sql().prepare('select count(*) as n from visits').get() as { n: number }).n).toBe(visitsBefore + 1)
    const visit = sql()
      .prepare("select v.id, v.site_id as siteId, v.scheduled_on as day, v.technician_id as tech, v.kind from visits v join visit_detectors vd on vd.visit_id = v.id where vd.detector_id = ? and v.status = 'planned'")
      .get(first.id) as { id: number; siteId: number; day: string; tech: number; kind: string }
    expect(visit).toMatchObject({ siteId: first.siteId, day: '2026-06-16', tech: site.usual!.id, kind: 'test' })

    // Asked again for the same detector, the dialog names that visit, links to it and books nothing.
    await expect(page.locator('[role=row][aria-selected=true]').count()).resolves.toBe(0)
    await page.keyboard.press('x')
    await openBooking()
    await dialog.getByText('Already on an open visit').waitFor()
    await expect(dialog.locator(`a[href="/visits/${visit.id}"]`).count()).resolves.toBe(1)
    await expect(dialog.getByRole('button', { name: 'Nothing left to book' }).isDisabled()).resolves.toBe(true)
    await page.keyboard.press('Escape')

    await expect(page.evaluate(() => (window as unknown as { __pointer: number }).__pointer)).resolves.toBe(0)
    await page.context().close()
  })
})
