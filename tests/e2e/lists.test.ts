import type { Page } from 'playwright-core'
import { describe, expect, it } from 'vitest'
import { DEMO_EMAIL, useSeededServer } from '#tests/setup/fixture'
import { sessionCookieFor, userIdByEmail } from '#tests/setup/sessions'
import { signInAs } from '#tests/setup/sign-in-browser'
import { TEST_TODAY } from '#tests/setup/temp-db'

// Every expected figure comes from plain SQL over the seeded database.
describe('list pages in Chromium', () => {
  const t = useSeededServer('small', { browser: true })
  const sql = () => t.data.db.$client
  const column = <T,>(query: string, ...params: unknown[]) => (sql().prepare(query).all(...params) as Array<Record<string, T>>).map((r) => Object.values(r)[0])

  async function signedInPage(email: string = DEMO_EMAIL.lead): Promise<Page> {
    const { cookie } = await sessionCookieFor(t.data.db, userIdByEmail(t.data.db, email))
    const context = await t.browser.newContext({ viewport: { width: 1440, height: 900 } })
    const [name, ...value] = cookie.split('=')
    await context.addCookies([{ name, value: value.join('='), domain: '127.0.0.1', path: '/' }])
    const page = await context.newPage()
    const errors: string[] = []
    page.on('pageerror', (e) => errors.push(e.message))
    ;(page as Page & { errors: string[] }).errors = errors
    return page
  }

  /** An instant on a site's clock, worked out by the runtime's own zone data, beside its UTC clock. */
  const onSiteClock = ({ at, zone }: { at: string; zone: string }) => {
    const p = Object.fromEntries(new Intl.DateTimeFormat('en-US', { timeZone: zone, hour: '2-digit', minute: '2-digit', hourCycle: 'h23', timeZoneName: 'short' }).formatToParts(new Date(at)).map((x) => [x.type, x.value]))
    return { clock: `${p.hour}:${p.minute}`, letters: p.timeZoneName, utcClock: at.slice(11, 16) }
  }

  /** The text of each shown row's cell under the header whose name starts with `header`, top first. */
  async function cells(page: Page, header: string, rows = 5): Promise<string[]> {
    return page.evaluate(
      ({ header, rows }) => {
        const heads = [...document.querySelectorAll('[role=columnheader]')].map((h) => h.textContent ?? '')
        const at = heads.findIndex((h) => h.startsWith(header))
        return Array.from({ length: rows }, (_, i) => {
          const row = document.querySelector(`[role=row][aria-rowindex="${i + 2}"]`)
          return row?.querySelectorAll('[role=cell]')[at]?.textContent ?? ''
        })
      },
      { header, rows },
    )
  }

  it('sorts by a header click, both ways, and says so to screen readers; shows street, town and monitoring', async () => {
    const page = await signedInPage()
    await page.goto(`${t.server.url}/sites`, { waitUntil: 'networkidle' })

    // The columns that used to come out blank: the first sites by name, as stored.
    const first = sql().prepare('select s.street, s.city, m.name as monitoring from sites s left join monitoring_companies m on m.id = s.monitoring_company_id order by s.name, s.id limit 3').all() as Array<{ street: string; city: string; monitoring: string | null }>
    await expect.poll(() => cells(page, 'Street', 3)).toEqual(first.map((r) => r.street))
    await expect(cells(page, 'Town', 3)).resolves.toEqual(first.map((r) => r.city))
    await expect(cells(page, 'Monitoring', 3)).resolves.toEqual(first.map((r) => r.monitoring ?? 'None on record'))

    const town = page.getByRole('columnheader', { name: /^Town/ })
    await expect(town.getAttribute('aria-sort')).resolves.toBe('none')
    await expect(page.getByRole('columnheader', { name: /^Site/ }).getAttribute('aria-sort')).resolves.toBe('ascending')

    await town.getByRole('button').click()
    await page.waitForURL(/[?&]sort=city&dir=asc/)
    const byTownAsc = column<string>('select name from sites order by city asc, id asc limit 5')
    await expect.poll(() => cells(page, 'Site')).toEqual(byTownAsc)
    await expect(town.getAttribute('aria-sort')).resolves.toBe('ascending')
    await expect(town.getByRole('button').textContent()).resolves.toContain('sorted ascending')

    await town.getByRole('button').click()
    await page.waitForURL(/[?&]sort=city&dir=desc/)
    const byTownDesc = column<string>('select name from sites order by city desc, id desc limit 5')
    expect(byTownDesc).not.toEqual(byTownAsc)
    await expect.poll(() => cells(page, 'Site')).toEqual(byTownDesc)
    await expect(town.getAttribute('aria-sort')).resolves.toBe('descending')
    await expect(page.getByRole('columnheader', { name: /^Site/ }).getAttribute('aria-sort')).resolves.toBe('none')
    expect((page as Page & { errors: string[] }).errors).toEqual([])
    await page.context().close()
  })

  it('shows each event on its site’s clock with the zone’s letters, at desk and phone width', async () => {
    // The newest events as stored (UTC instants) with their sites' zones.
    const newest = sql().prepare('select e.occurred_at as at, s.time_zone as zone from events e join sites s on s.id = e.site_id order by e.occurred_at desc, e.id desc limit 5').all() as Array<{ at: string; zone: string }>
    const expected = newest.map(onSiteClock)
    // The seed's sites keep their own zones: the check below tells a site's clock from UTC.
    expect(expected.some((e) => e.letters !== 'UTC' && e.clock !== e.utcClock)).toBe(true)
    const readsRight = (text: string, e: ReturnType<typeof onSiteClock>) => text.includes(`${e.clock} ${e.letters}`) && (e.letters === 'UTC' || !/UTC/.test(text))

    const page = await signedInPage()
    await page.goto(`${t.server.url}/events`, { waitUntil: 'networkidle' })
    const when = page.getByRole('columnheader', { name: /^When/ })
    await expect(when.innerText()).resolves.not.toMatch(/UTC/)
    await expect.poll(async () => (await cells(page, 'When', 5)).map((text, i) => readsRight(text, expected[i]) || text)).toEqual(expected.map(() => true))
    await page.context().close()

    const { cookie } = await sessionCookieFor(t.data.db, userIdByEmail(t.data.db, DEMO_EMAIL.lead))
    const context = await t.browser.newContext({ viewport: { width: 390, height: 844 }, isMobile: true, hasTouch: true })
    const [name, ...value] = cookie.split('=')
    await context.addCookies([{ name, value: value.join('='), domain: '127.0.0.1', path: '/' }])
    const phone = await context.newPage()
    await phone.goto(`${t.server.url}/events`, { waitUntil: 'networkidle' })
    const card = (i: number) => phone.locator(`[role=row][aria-rowindex="${i + 2}"] a`).innerText()
    await expect.poll(async () => Promise.all(expected.map(async (e, i) => readsRight(await card(i), e) || (await card(i))))).toEqual(expected.map(() => true))
    await context.close()
  })

  it('offers only the orders the server accepts', async () => {
    const page = await signedInPage()
    await page.goto(`${t.server.url}/events`, { waitUntil: 'networkidle' })
    // Across all events only time sorts.
    await expect(page.getByRole('columnheader', { name: /^When/ }).getByRole('button').count()).resolves.toBe(1)
    for (const name of [/^Kind/, /^Site/, /^Detail/]) {
      await expect(page.getByRole('columnheader', { name }).getByRole('button').count()).resolves.toBe(0)
      await expect(page.getByRole('columnheader', { name }).getAttribute('aria-sort')).resolves.toBeNull()
    }
    // Within one site every column sorts.
    const site = (sql().prepare('select site_id as id from events group by site_id order by count(*) desc limit 1').get() as { id: number }).id
    await page.goto(`${t.server.url}/events?site=${site}`, { waitUntil: 'networkidle' })
    await expect(page.getByRole('columnheader', { name: /^Kind/ }).getByRole('button').count()).resolves.toBe(1)

    await page.goto(`${t.server.url}/triage`, { waitUntil: 'networkidle' })
    await expect(page.getByRole('columnheader', { name: /^Why/ }).getByRole('button').count()).resolves.toBe(0)
    await expect(page.getByRole('columnheader', { name: /^Risk/ }).getAttribute('aria-sort')).resolves.toBe('descending')
    await page.context().close()
  })

  it('saves a view, reopens it with its text filter, asks before replacing, renames and deletes it', async () => {
    const page = await signedInPage(DEMO_EMAIL.office)
    const office = userIdByEmail(t.data.db, DEMO_EMAIL.office)
    const stored = () => sql().prepare("select name, query from saved_views where user_id = ? and page = 'devices' order by id").all(office)
    await page.goto(`${t.server.url}/devices`, { waitUntil: 'networkidle' })

    await page.getByRole('searchbox').fill('rtu')
    await page.waitForURL(/[?&]q=rtu/)
    await page.getByRole('search').getByLabel('State').selectOption('trouble')
    await page.waitForURL(/state=trouble/)
    await page.getByRole('button', { name: 'Save view…' }).click()
    await page.getByRole('textbox', { name: 'View name' }).fill('Trouble units')
    await page.keyboard.press('Enter')
    await page.getByRole('status').filter({ hasText: 'Saved “Trouble units”.' }).waitFor()
    expect(stored()).toEqual([{ name: 'Trouble units', query: 'q=rtu&state=trouble' }])

    await page.getByRole('button', { name: 'Clear 2 filters' }).click()
    await page.waitForURL((u) => !u.search.includes('q='))
    await expect(page.getByRole('searchbox').inputValue()).resolves.toBe('')

    // Opening it brings back the text filter too, and it stays past the field's typing delay.
    await page.getByRole('combobox', { name: /^Saved views/ }).selectOption({ label: 'Trouble units' })
    await page.waitForURL(/q=rtu&state=trouble/)
    await page.waitForTimeout(700)
    expect(new URL(page.url()).searchParams.get('q')).toBe('rtu')
    await expect(page.getByRole('searchbox').inputValue()).resolves.toBe('rtu')
    const trouble = (sql().prepare("select count(*) as n from detectors where state = 'trouble'").get() as { n: number }).n
    await page.getByRole('status').filter({ hasText: /detectors/ }).waitFor()
    const shown = Number((await page.getByRole('status').filter({ hasText: /detectors/ }).textContent())!.match(/^([\d,]+)/)![1].replace(/,/g, ''))
    expect(shown).toBeGreaterThan(0)
    expect(shown).toBeLessThanOrEqual(trouble)

    // Saving under the same name asks first; nothing changes until the person says yes.
    await page.getByRole('search').getByLabel('State').selectOption('alarm')
    await page.waitForURL(/state=alarm/)
    await page.getByRole('button', { name: 'Save view…' }).click()
    await page.getByRole('textbox', { name: 'View name' }).fill('Trouble units')
    await page.keyboard.press('Enter')
    const confirm = page.getByRole('group', { name: 'Confirm' })
    await confirm.filter({ hasText: 'You already have a view named “Trouble units”. Replace it with the filters on screen?' }).waitFor()
    expect(stored()).toEqual([{ name: 'Trouble units', query: 'q=rtu&state=trouble' }])
    await confirm.getByRole('button', { name: 'Replace' }).click()
    await page.getByRole('status').filter({ hasText: 'Saved “Trouble units”.' }).waitFor()
    expect(stored()).toEqual([{ name: 'Trouble units', query: 'q=rtu&state=alarm' }])

    await page.getByText('Manage views').click()
    await page.getByRole('button', { name: 'Rename Trouble units' }).click()
    await page.getByRole('textbox', { name: /New name/ }).fill('Alarm units')
    await page.getByRole('button', { name: 'Rename', exact: true }).click()
    await page.getByRole('status').filter({ hasText: 'Renamed “Trouble units” to “Alarm units”.' }).waitFor()
    expect(stored()).toEqual([{ name: 'Alarm units', query: 'q=rtu&state=alarm' }])

    await page.getByText('Manage views').click()
    await page.getByRole('button', { name: 'Delete Alarm units' }).click()
    await confirm.filter({ hasText: 'Delete the view “Alarm units”?' }).waitFor()
    expect(stored()).toHaveLength(1)
    await confirm.getByRole('button', { name: 'Delete' }).click()
    await page.getByRole('status').filter({ hasText: 'Deleted “Alarm units”.' }).waitFor()
    expect(stored()).toEqual([])
    await expect.poll(() => page.getByRole('combobox', { name: /^Saved views/ }).locator('option').allTextContents()).toEqual(['None yet'])
    await page.context().close()
  })

  it('opens visits on today’s work, soonest first, with technician and date filters', async () => {
    const page = await signedInPage(DEMO_EMAIL.office)
    await page.goto(`${t.server.url}/visits`, { waitUntil: 'networkidle' })
    expect(new URL(page.url()).search).toBe(`?from=${TEST_TODAY}&sort=scheduledOn&dir=asc`)
    await expect(page.getByLabel('From', { exact: true }).inputValue()).resolves.toBe(TEST_TODAY)
    await expect(page.getByRole('columnheader', { name: /^Date/ }).getAttribute('aria-sort')).resolves.toBe('ascending')

    const upcoming = column<string>('select scheduled_on from visits where scheduled_on >= ? order by scheduled_on, id', TEST_TODAY)
    const all = (sql().prepare('select count(*) as n from visits').get() as { n: number }).n
    expect(upcoming.length).toBeGreaterThan(3)
    expect(upcoming.length).toBeLessThan(all)
    await page.getByRole('status').filter({ hasText: new RegExp(`^${upcoming.length} visits`) }).waitFor()
    await expect.poll(() => cells(page, 'Date', 3)).toEqual(upcoming.slice(0, 3))

    const tech = sql().prepare("select u.id, u.name, count(*) as n from visits v join users u on u.id = v.technician_id where v.scheduled_on >= ? group by u.id order by n desc limit 1").get(TEST_TODAY) as { id: number; name: string; n: number }
    await page.getByRole('search').getByLabel('Technician').selectOption({ label: tech.name })
    await page.waitForURL(new RegExp(`technician=${tech.id}`))
    await page.getByRole('status').filter({ hasText: new RegExp(`^${tech.n} visits`) }).waitFor()
    await expect.poll(() => cells(page, 'Technician', Math.min(tech.n, 3))).toEqual(Array(Math.min(tech.n, 3)).fill(tech.name))
    await page.context().close()
  })

  it('links the detector page’s breadcrumb to its customer, site and unit', async () => {
    const d = sql().prepare('select d.id, d.customer_id as customerId, d.site_id as siteId, d.unit_id as unitId, s.name as site from detectors d join sites s on s.id = d.site_id order by d.id limit 1').get() as { id: number; customerId: number; siteId: number; unitId: number; site: string }
    const page = await signedInPage()
    await page.goto(`${t.server.url}/devices/${d.id}`, { waitUntil: 'networkidle' })
    const crumbs = page.getByRole('navigation', { name: 'Breadcrumb' }).getByRole('link')
    await expect(crumbs.evaluateAll((links) => links.map((a) => a.getAttribute('href')))).resolves.toEqual([`/customers/${d.customerId}`, `/sites/${d.siteId}`, `/units/${d.unitId}`])
    await crumbs.nth(1).click()
    await page.waitForURL(`${t.server.url}/sites/${d.siteId}`)
    await page.getByRole('heading', { level: 1, name: d.site }).waitFor()
    await page.context().close()
  })

  it('g keys, help and palette leave out sections the role may not open', async () => {
    const page = await signedInPage(DEMO_EMAIL.office)
    await page.goto(`${t.server.url}/devices`, { waitUntil: 'networkidle' })
    await page.keyboard.press('g')
    await page.keyboard.press('u')
    await page.waitForTimeout(400)
    expect(new URL(page.url()).pathname).toBe('/devices')
    await page.keyboard.press('?')
    const help = page.getByRole('dialog', { name: 'Keyboard shortcuts' })
    await help.waitFor()
    await expect(help.innerText()).resolves.toContain('Go to Visits')
    await expect(help.innerText()).resolves.not.toContain('Go to Users')
    await page.keyboard.press('Escape')
    await page.keyboard.press('Control+k')
    await page.keyboard.type('users')
    const palette = page.getByRole('dialog', { name: 'Command palette' })
    await palette.waitFor()
    await page.waitForTimeout(300)
    await expect(palette.locator('[cmdk-item][data-value="section:/admin/users"]').count()).resolves.toBe(0)
    await page.keyboard.press('Escape')
    await page.keyboard.press('g')
    await page.keyboard.press('c')
    await page.waitForURL(`${t.server.url}/customers`)
    await page.context().close()
  })

  it('shows the first rows with the page: none asked for again on loading, on a move or on a filter; later windows still asked', async () => {
    const page = await signedInPage(DEMO_EMAIL.office)
    const asked: string[] = []
    page.on('request', (r) => {
      const u = new URL(r.url())
      if (u.pathname.startsWith('/api/')) asked.push(u.pathname + u.search)
    })
    const complaints: string[] = []
    page.on('console', (m) => m.type() === 'error' && complaints.push(m.text()))
    const firstWindows = (list: string) => asked.filter((u) => u.startsWith(`/api/${list}?`) && u.includes('offset=0'))

    await page.goto(`${t.server.url}/devices?state=trouble&sort=tag&dir=asc`, { waitUntil: 'networkidle' })
    const trouble = column<string>("select tag from detectors where state = 'trouble' order by tag, id limit 3")
    await expect.poll(() => cells(page, 'Tag', 3)).toEqual(trouble)
    expect(firstWindows('devices')).toEqual([])

    // A move through the rail: the newest events, from the page's own data.
    await page.locator('nav a[href="/events"]').first().click()
    await page.waitForURL(`${t.server.url}/events`)
    // Each shown on its site's clock: the time and zone after the day ("15 Jun 2026, 03:45 PDT").
    const newest = (kind?: string) =>
      (sql().prepare(`select e.occurred_at as at, s.time_zone as zone from events e join sites s on s.id = e.site_id ${kind ? 'where e.kind = ?' : ''} order by e.occurred_at desc, e.id desc limit 3`).all(...(kind ? [kind] : [])) as Array<{ at: string; zone: string }>).map(
        (e) => `${onSiteClock(e).clock} ${onSiteClock(e).letters}`,
      )
    const whenShown = async () => (await cells(page, 'When', 3)).map((text) => text.split(', ').pop())
    await expect.poll(whenShown).toEqual(newest())

    // Scrolling on asks the route for the next window, as before.
    await page.locator('[role="table"]').locator('xpath=..').evaluate((el) => el.scrollTo({ top: 150 * 36 }))
    await expect.poll(() => asked.some((u) => u.startsWith('/api/events?') && u.includes('offset=100'))).toBe(true)

    // A filter chosen on the page: its first rows come with the page's data too.
    await page.locator('label', { hasText: /^Kind/ }).locator('select').selectOption('alarm')
    await page.waitForURL(/[?&]kind=alarm/)
    await expect.poll(whenShown).toEqual(newest('alarm'))
    await page.waitForLoadState('networkidle')
    expect(firstWindows('events')).toEqual([])
    expect(complaints).toEqual([])
    expect((page as Page & { errors: string[] }).errors).toEqual([])
    await page.context().close()
  })

  it('a failed answer is said in place with a retry, never as the error page', async () => {
    const page = await signedInPage()
    // The first answers of the queue's counts fail as an overloaded server would (its first rows come
    // with the page; a refresh or a retry of them would fail the same way).
    let failures = 0
    await page.route(/\/api\/triage\?/, async (route) => {
      if (failures < 2) {
        failures++
        return route.fulfill({ status: 503, contentType: 'application/json', body: JSON.stringify({ error: 'The database is busy; try again.' }) })
      }
      return route.continue()
    })
    // SWR would retry a 5xx by itself after a few seconds: the person's retry must not need that.
    await page.goto(`${t.server.url}/triage`, { waitUntil: 'domcontentloaded' })
    const alerts = page.getByRole('alert')
    await alerts.filter({ hasText: 'The database is busy; try again.' }).first().waitFor()
    await expect(page.getByRole('heading', { level: 1, name: 'Triage' }).isVisible()).resolves.toBe(true)
    await expect(page.getByRole('heading', { name: 'Something went wrong' }).count()).resolves.toBe(0)
    const retry = page.getByRole('button', { name: 'Try again' })
    expect(await retry.count()).toBeGreaterThan(0)
    for (let i = 0; i < 5 && (await retry.count()) > 0; i++) {
      await retry.first().click().catch(() => undefined) // it may go as the answer arrives
      await page.waitForTimeout(200)
    }
    const open = (sql().prepare('select count(*) as n from detectors where risk_score > 0 and acknowledged_at is null').get() as { n: number }).n
    await page.getByText(`${open} open · ranked by risk, worst first`).waitFor()
    await page.getByRole('status').filter({ hasText: new RegExp(`^${open} detectors in the queue`) }).waitFor()
    await expect(alerts.filter({ hasText: 'busy' }).count()).resolves.toBe(0)
    expect((page as Page & { errors: string[] }).errors).toEqual([])
    await page.context().close()
  })

  it('an ended session goes to sign-in and comes back to the same page and filters', async () => {
    const context = await t.browser.newContext()
    const page = await context.newPage()
    const path = '/sites?q=copper&sort=city&dir=desc'
    await signInAs(page, t.server.url, DEMO_EMAIL.lead, path)
    expect(page.url()).toBe(t.server.url + path)
    await page.getByRole('searchbox').waitFor()
    await expect(page.getByRole('searchbox').inputValue()).resolves.toBe('copper')
    // Let the page's own list request finish first, so the refusal comes from the save below.
    await page.waitForLoadState('networkidle')

    const lead = userIdByEmail(t.data.db, DEMO_EMAIL.lead)
    sql().prepare("update sessions set revoked_at = strftime('%Y-%m-%dT%H:%M:%fZ','now') where user_id = ? and revoked_at is null").run(lead)
    // A request the page makes by itself (no navigation): saving a view.
    await page.getByRole('button', { name: 'Save view…' }).click()
    await page.getByRole('textbox', { name: 'View name' }).fill('Copper towns')
    await page.keyboard.press('Enter')
    await page.waitForURL(/\/sign-in\?returnTo=/)
    expect(new URL(page.url()).searchParams.get('returnTo')).toBe(path)
    await page.getByRole('button', { name: 'Sign in with company account' }).click()
    // The provider may still know the person from the first sign-in and skip its account list.
    await page.waitForURL((u) => u.pathname.startsWith('/interaction/') || u.href === t.server.url + path)
    if (page.url().includes('/interaction/')) await page.getByRole('button', { name: /lead@ductkeeper\.test/ }).click()
    await page.waitForURL(t.server.url + path)
    await expect(page.getByRole('searchbox').inputValue()).resolves.toBe('copper')
    await context.close()
  })

  it('an ended session on Triage goes to sign-in, never to the error page', async () => {
    const page = await signedInPage()
    await page.goto(`${t.server.url}/triage`, { waitUntil: 'networkidle' })
    await page.getByRole('heading', { level: 1, name: 'Triage' }).waitFor()
    const lead = userIdByEmail(t.data.db, DEMO_EMAIL.lead)
    sql().prepare("update sessions set revoked_at = strftime('%Y-%m-%dT%H:%M:%fZ','now') where user_id = ? and revoked_at is null").run(lead)
    // Coming back to the window makes the page ask again, as its timed refresh does.
    for (let i = 0; i < 20 && !page.url().includes('/sign-in'); i++) {
      // The page may be leaving for sign-in as the event is sent; that is the outcome sought.
      await page.evaluate(() => window.dispatchEvent(new Event('focus'))).catch(() => undefined)
      await page.waitForTimeout(500)
    }
    await page.waitForURL(/\/sign-in\?returnTo=%2Ftriage/)
    await expect(page.getByRole('heading', { name: 'Something went wrong' }).count()).resolves.toBe(0)
    expect((page as Page & { errors: string[] }).errors).toEqual([])
    await page.context().close()
  })
})
