import axe from 'axe-core'
import type { Page } from 'playwright-core'
import { beforeAll, describe, expect, it } from 'vitest'
import { DEMO_EMAIL, useSeededServer } from '#tests/setup/fixture'
import { sessionCookieFor, userIdByEmail } from '#tests/setup/sessions'
import { can, ROLE_KEYS, type Capability, type Role } from '~/domain/permissions'
import { DETECTOR_STATES } from '~/domain/vocabulary'
import { sectionsFor } from '~/utils/sections'

const SIZES = {
  phone: { viewport: { width: 390, height: 844 }, isMobile: true, hasTouch: true },
  desk: { viewport: { width: 1440, height: 900 }, isMobile: false, hasTouch: false },
} as const
type Size = keyof typeof SIZES

// Drawing text smaller than this on a phone cannot be read on a roof.
const MIN_DRAWING_TEXT_PX = 11
// The smallest comfortable finger target.
const MIN_TOUCH_PX = 44

// axe's own source, injected into each page it checks.
const axeSource = axe.source

interface Stop {
  path: string
  needs: Capability
  /** A virtualized list: wait for its first row. */
  list?: boolean
  /** Holds the wiring drawing, whose text must stay legible. */
  drawing?: boolean
}

describe('every main page at phone and desk width, for every role', () => {
  const t = useSeededServer('small', { browser: true })
  let stops: Stop[] = []

  beforeAll(() => {
    const sql = t.data.db.$client
    // One record of each kind, all reached from one detector so the pages belong together.
    const d = sql.prepare('select id, unit_id as unitId, site_id as siteId, customer_id as customerId from detectors order by id limit 1').get() as Record<string, number>
    const visit = sql.prepare('select visit_id as id from visit_detectors order by visit_id limit 1').get() as { id: number }
    stops = [
      { path: '/overview', needs: 'view:fleet' },
      { path: '/triage', needs: 'view:fleet' },
      { path: '/my-day', needs: 'record:work' },
      { path: '/devices', needs: 'view:fleet', list: true },
      { path: `/devices/${d.id}`, needs: 'view:fleet', drawing: true },
      { path: `/units/${d.unitId}`, needs: 'view:fleet' },
      { path: `/sites/${d.siteId}`, needs: 'view:fleet' },
      { path: `/customers/${d.customerId}`, needs: 'view:fleet' },
      { path: '/sites', needs: 'view:fleet', list: true },
      { path: '/customers', needs: 'view:fleet', list: true },
      { path: '/visits', needs: 'view:fleet', list: true },
      { path: `/visits/${visit.id}`, needs: 'view:fleet' },
      { path: '/events', needs: 'view:fleet', list: true },
      { path: '/admin/users', needs: 'manage:users' },
      { path: '/admin/audit', needs: 'view:audit' },
      { path: '/admin/tokens', needs: 'manage:tokens' },
      { path: '/cycles', needs: 'schedule:visits' },
      { path: '/delay-audit', needs: 'schedule:visits' },
      { path: '/import', needs: 'edit:records' },
      { path: '/settings', needs: 'receive:digest' },
      { path: '/admin/calendar', needs: 'manage:settings' },
      { path: '/admin/outbox', needs: 'manage:settings' },
    ]
  })

  async function contextFor(role: Role, size: Size) {
    const { cookie } = await sessionCookieFor(t.data.db, userIdByEmail(t.data.db, DEMO_EMAIL[role]))
    const context = await t.browser.newContext(SIZES[size])
    const [name, ...value] = cookie.split('=')
    await context.addCookies([{ name, value: value.join('='), domain: '127.0.0.1', path: '/' }])
    return context
  }

  /** What is wrong with the page as it stands, in words; empty when nothing is. */
  async function problems(page: Page, stop: Stop, size: Size): Promise<string[]> {
    const width = SIZES[size].viewport.width
    return page.evaluate(
      ({ width, phone, drawing, list, minText, minTouch }) => {
        const out: string[] = []
        const doc = document.documentElement
        // A phone browser widens its layout to fit content that overflows, so innerWidth grows too.
        if (doc.scrollWidth > width || innerWidth !== width) out.push(`document is ${doc.scrollWidth} px wide (window ${innerWidth}) in a ${width} px viewport`)
        const shown = (el: Element) => {
          const b = el.getBoundingClientRect()
          return b.width > 0 && b.height > 0 && getComputedStyle(el).visibility !== 'hidden'
        }
        if (phone) {
          const keys = [...document.querySelectorAll('kbd')].filter(shown).map((k) => k.textContent)
          if (keys.length) out.push(`key hints shown on a touch screen: ${keys.join(', ')}`)
          if (/j\/k to move/.test(document.body.innerText)) out.push('"j/k to move" shown on a touch screen')
          // Every control a finger presses: buttons, choices, and fields (tick boxes have a wider label).
          const controls = [...document.querySelectorAll('main button, main select, main input:not([type=checkbox]):not([type=radio]):not([type=hidden])')].filter(shown)
          const short = controls.filter((c) => c.getBoundingClientRect().height < minTouch)
          if (short.length) out.push(`controls shorter than ${minTouch} px: ${short.slice(0, 5).map((c) => (c.textContent || c.getAttribute('aria-label') || c.getAttribute('name') || c.tagName).trim().slice(0, 30)).join(' | ')}`)
          // A tick box is pressed through its label: the label is the finger's target.
          const ticks = [...document.querySelectorAll('main label:has(> input[type=checkbox]), main label:has(> input[type=radio])')].filter(shown)
          const shortTicks = ticks.filter((l) => l.getBoundingClientRect().height < minTouch)
          if (shortTicks.length) out.push(`tick box labels shorter than ${minTouch} px: ${shortTicks.slice(0, 5).map((l) => (l.textContent ?? '').trim().slice(0, 30)).join(' | ')}`)
        }
        if (drawing) {
          const texts = [...document.querySelectorAll('main svg[role="img"] text')].filter(shown)
          if (texts.length === 0) out.push('no wiring drawing text found')
          if (phone) {
            for (const text of texts as SVGTextElement[]) {
              // The size on screen: the computed size scaled by the drawing's viewBox.
              const ctm = text.getScreenCTM()
              const px = parseFloat(getComputedStyle(text).fontSize) * (ctm ? Math.hypot(ctm.a, ctm.b) : 1)
              if (px < minText) out.push(`drawing text "${text.textContent}" is ${px.toFixed(1)} px`)
            }
          }
        }
        if (list && phone) {
          const rows = [...document.querySelectorAll('[role=table] [role=row] a')].filter(shown)
          if (rows.length === 0) out.push('no row links')
          const small = rows.filter((a) => a.getBoundingClientRect().height < minTouch)
          if (small.length) out.push(`${small.length} row links shorter than ${minTouch} px`)
          // A card's lines (site and town, next due, who) wrap: none cut short at the side or the foot,
          // and none reaching past its row.
          const lines = rows.flatMap((a) => [...a.children].slice(1)) as HTMLElement[]
          const cut = lines.filter((l) => {
            const row = l.closest('[role=row]')!.getBoundingClientRect()
            return l.scrollWidth > l.clientWidth + 1 || l.scrollHeight > l.clientHeight + 1 || l.getBoundingClientRect().bottom > row.bottom + 1
          })
          if (cut.length) out.push(`${cut.length} card lines cut short: ${cut.slice(0, 3).map((l) => (l.textContent ?? '').slice(0, 50)).join(' | ')}`)
        }
        return out
      },
      { width, phone: size === 'phone', drawing: !!stop.drawing, list: !!stop.list, minText: MIN_DRAWING_TEXT_PX, minTouch: MIN_TOUCH_PX },
    )
  }

  /** Follows an in-app link to `path` (the router's own navigate); returns the route error, if any. */
  async function navigateInApp(page: Page, path: string): Promise<string | null> {
    type Router = { navigate: (to: string) => Promise<void>; state: { navigation: { state: string }; location: { pathname: string }; errors: Record<string, unknown> | null } }
    await page.evaluate((to) => (window as unknown as { __reactRouterDataRouter: Router }).__reactRouterDataRouter.navigate(to), path)
    await page.waitForFunction((to) => {
      const r = (window as unknown as { __reactRouterDataRouter: Router }).__reactRouterDataRouter
      return r.state.navigation.state === 'idle' && r.state.location.pathname === to
    }, path)
    return page.evaluate(async () => {
      // Two frames: the router's new state is committed to the page by then.
      await new Promise((done) => requestAnimationFrame(() => requestAnimationFrame(done)))
      const errors = (window as unknown as { __reactRouterDataRouter: Router }).__reactRouterDataRouter.state.errors
      return errors ? JSON.stringify(errors) : null
    })
  }

  const cases = ROLE_KEYS.flatMap((role) => (['phone', 'desk'] as const).map((size) => [role, size] as const))

  // The ceiling is wide for the admin's desk run, which also puts every page through axe.
  it.each(cases)('%s at %s width: no page wider than the screen, drawings legible, no console errors', async (role, size) => {
    const context = await contextFor(role, size)
    const page = await context.newPage()
    const errors: string[] = []
    page.on('console', (m) => m.type() === 'error' && errors.push(`${page.url()}: ${m.text()}`))
    page.on('pageerror', (e) => errors.push(`${page.url()}: ${e.message}`))
    const found: string[] = []
    const mine = stops.filter((s) => can(role, s.needs))

    // The admin reaches every page: each is loaded whole, from the server (so hydration is checked).
    // Other roles move inside the app as people do, which keeps the walk quick.
    const whole = role === 'admin'
    for (const [i, stop] of mine.entries()) {
      const t0 = Date.now()
      if (whole || i === 0) {
        const res = await page.goto(t.server.url + stop.path, { waitUntil: 'load' })
        if (res?.status() !== 200) {
          found.push(`${stop.path}: answered ${res?.status()}`)
          continue
        }
        // The server's HTML holds a list's first rows as the desk table; on a phone the cards take its
        // place once the scripts run, so the page is judged after that.
        await page.waitForFunction(() => Object.keys(document.body).some((k) => k.startsWith('__react')))
      } else {
        const error = await navigateInApp(page, stop.path)
        if (error) {
          found.push(`${stop.path}: ${error}`)
          continue
        }
      }
      await page.locator('main h1').first().waitFor()
      if (stop.list) {
        await page.locator('[role=table] [role=row][aria-rowindex="2"] a, main [role=alert]').first().waitFor()
        if (await page.locator('main [role=alert]').count()) found.push(`${stop.path}: ${await page.locator('main [role=alert]').first().innerText()}`)
      }
      for (const p of await problems(page, stop, size)) found.push(`${stop.path}: ${p}`)
      if (process.env.WALK_TIMES) console.log(role, size, stop.path, Date.now() - t0)
      if (size === 'desk' && role === 'admin') {
        // Every page once, at desk width, through axe: nothing it rates critical.
        await page.addScriptTag({ content: axeSource })
        const critical = await page.evaluate(async () => {
          const axe = (window as unknown as { axe: { run: (c: Document, o: object) => Promise<{ violations: Array<{ id: string; impact: string | null; nodes: unknown[] }> }> } }).axe
          const r = await axe.run(document, { resultTypes: ['violations'] })
          return r.violations.filter((v) => v.impact === 'critical').map((v) => `${v.id} (${v.nodes.length})`)
        })
        if (critical.length) found.push(`${stop.path}: axe critical ${critical.join(', ')}`)
      }
    }

    const nav = page.getByRole('navigation', { name: 'Sections' })
    const labels = sectionsFor(role).map((s) => s.label)
    if (size === 'phone') {
      // The menu lists every section the role may see, each a finger-sized target, and folds away
      // once one is chosen.
      await page.goto(`${t.server.url}/overview`, { waitUntil: 'load' })
      const menu = page.getByRole('button', { name: /^Menu/ })
      const menuHeight = (await menu.boundingBox())?.height ?? 0
      if (menuHeight < MIN_TOUCH_PX) found.push(`Menu button is ${menuHeight} px tall`)
      if (await nav.isVisible()) found.push('sections shown before the menu is opened')
      await menu.click()
      const links = nav.getByRole('link')
      const shown = await links.allInnerTexts()
      if (shown.join() !== labels.join()) found.push(`menu lists ${shown.join(', ')}; expected ${labels.join(', ')}`)
      const heights = await links.evaluateAll((els) => els.map((e) => e.getBoundingClientRect().height))
      if (heights.some((h) => h < MIN_TOUCH_PX)) found.push(`menu items ${heights.join(', ')} px tall`)
      await links.filter({ hasText: /^Events$/ }).click()
      await page.waitForURL(/\/events$/)
      await expect.poll(() => nav.isVisible()).toBe(false)
    } else {
      const shown = await nav.getByRole('link').allInnerTexts()
      if (shown.join() !== labels.join()) found.push(`rail lists ${shown.join(', ')}; expected ${labels.join(', ')}`)
    }

    expect(found).toEqual([])
    expect(errors).toEqual([])
    await context.close()
  }, 240_000)

  it('a list address the server refuses says what was wrong and offers a way back', async () => {
    const context = await contextFor('office', 'phone')
    const page = await context.newPage()
    await page.goto(`${t.server.url}/devices?state=xyz&sort=nonsense`, { waitUntil: 'load' })
    const alert = page.locator('main [role=alert]')
    await alert.waitFor()
    const text = await alert.innerText()
    expect(text).toContain('“xyz” is not a state this list knows')
    expect(text).toContain(`It takes one of: ${DETECTOR_STATES.join(', ')}.`)
    expect(text).toContain('“nonsense” is not a sort this list knows')
    expect(text).not.toContain('Invalid option')
    await alert.getByRole('link', { name: 'Reset the view' }).click()
    await page.waitForURL((u) => u.pathname === '/devices' && u.search === '')
    await page.locator('[role=table] [role=row][aria-rowindex="2"] a').first().waitFor()
    await expect(alert.count()).resolves.toBe(0)
    const total = (t.data.db.$client.prepare('select count(*) as n from detectors').get() as { n: number }).n
    await expect(page.getByRole('status').filter({ hasText: /detectors$/ }).innerText()).resolves.toBe(`${total.toLocaleString('en-US')} detectors`)
    await context.close()
  })
})
