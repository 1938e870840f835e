import axe from 'axe-core'
import type { Browser, Page } from 'playwright-core'
import type { Db } from '~/.server/db'
import { SECTIONS } from '~/utils/sections'
import { makeVisits } from './bulk'
import { DEMO_EMAIL } from './fixture'
import { sessionCookieFor, userIdByEmail } from './sessions'
import { TEST_TODAY } from './temp-db'

export const WIDTHS = {
  phone: { viewport: { width: 390, height: 844 }, isMobile: true, hasTouch: true },
  desk: { viewport: { width: 1440, height: 900 }, isMobile: false, hasTouch: false },
} as const

export interface A11yStop {
  path: string
  /** Who opens it: the administrator sees every section; the visit form is its technician's; null: no one signed in. */
  as: keyof typeof DEMO_EMAIL | null
}

/**
 * Every section of the console (from the one list the navigation reads, so a new section is
 * checked by itself), one record page of each kind, and the visit form: a visit under way,
 * opened by its technician.
 */
export function a11yStops(db: Db): A11yStop[] {
  const q = db.$client
  const d = q.prepare('select id, unit_id as unitId, site_id as siteId, customer_id as customerId from detectors order by id limit 1').get() as Record<string, number>
  const visit = q.prepare('select visit_id as id from visit_detectors order by visit_id limit 1').get() as { id: number }
  return [
    ...SECTIONS.map((s) => ({ path: s.to, as: 'admin' as const })),
    { path: `/devices/${d.id}`, as: 'admin' },
    { path: `/devices/${d.id}/edit`, as: 'admin' },
    { path: `/units/${d.unitId}`, as: 'admin' },
    { path: `/sites/${d.siteId}`, as: 'admin' },
    { path: `/customers/${d.customerId}`, as: 'admin' },
    { path: `/visits/${visit.id}`, as: 'admin' },
    { path: visitFormPath(db), as: 'technician' },
    { path: '/sign-in', as: null },
  ]
}

/** A visit under way at the busiest site, assigned to the demo technician: its page is the form. */
export function visitFormPath(db: Db): string {
  const q = db.$client
  const tech = userIdByEmail(db, DEMO_EMAIL.technician)
  const site = q.prepare('select site_id as id from detectors group by site_id order by count(*) desc limit 1').get() as { id: number }
  const [id] = makeVisits(db, { n: 1, siteId: site.id, date: TEST_TODAY, technicianId: tech, detectors: 4 })
  q.prepare("update visits set status = 'in-progress', started_at = ? where id = ?").run(`${TEST_TODAY}T13:00:00.000Z`, id)
  return `/visits/${id}`
}

export async function pageAs(browser: Browser, db: Db, who: keyof typeof DEMO_EMAIL | null, width: keyof typeof WIDTHS) {
  const context = await browser.newContext(WIDTHS[width])
  if (!who) return { context, page: await context.newPage() }
  const { cookie } = await sessionCookieFor(db, userIdByEmail(db, DEMO_EMAIL[who]))
  const [name, ...value] = cookie.split('=')
  await context.addCookies([{ name, value: value.join('='), domain: '127.0.0.1', path: '/' }])
  return { context, page: await context.newPage() }
}

type AxeRun = (c: Document, o: object) => Promise<{ violations: Array<{ id: string; impact: string | null; help: string; nodes: Array<{ target: unknown[]; failureSummary?: string }> }> }>

/** axe's serious and critical violations on the page as it stands, one line each with its first elements. */
export async function axeProblems(page: Page): Promise<string[]> {
  if (!(await page.evaluate(() => 'axe' in window))) await page.addScriptTag({ content: axe.source })
  return page.evaluate(async () => {
    const run = (window as unknown as { axe: { run: AxeRun } }).axe.run
    const r = await run(document, { resultTypes: ['violations'] })
    return r.violations
      .filter((v) => v.impact === 'serious' || v.impact === 'critical')
      .map((v) => `${v.impact} ${v.id}: ${v.help} — ${v.nodes.slice(0, 4).map((n) => JSON.stringify(n.target)).join(' ')}${v.nodes.length > 4 ? ` and ${v.nodes.length - 4} more` : ''}`)
  })
}

/**
 * Controls a keyboard cannot reach: walks the page with Tab and lists every shown button, link and
 * field it never lands on, and anything that looks pressable (a pointer cursor) but is neither
 * focusable nor inside something focusable. Composite widgets that move focus with arrow keys
 * (their inactive items have tabindex -1) are left to their own keys.
 */
export async function keyboardGaps(page: Page, maxTabs = 400): Promise<string[]> {
  await page.evaluate(() => {
    ;(document.activeElement as HTMLElement | null)?.blur()
    let n = 0
    for (const el of document.querySelectorAll<HTMLElement>('a[href], button, input, select, textarea, summary, [tabindex], [role=button], [role=link], [role=tab], [role=checkbox], [role=switch]')) el.dataset.kbId = String(n++)
  })
  const reached = new Set<string>()
  let last = ''
  for (let i = 0; i < maxTabs; i++) {
    await page.keyboard.press('Tab')
    const id = await page.evaluate(() => (document.activeElement as HTMLElement | null)?.dataset.kbId ?? '')
    if (id) reached.add(id)
    // Back at the first stop: the whole cycle has been walked.
    if (id && id === last) break
    if (i === 0) last = id
  }
  return page.evaluate((reachedIds) => {
    const out: string[] = []
    const shown = (el: Element) => {
      const b = el.getBoundingClientRect()
      const s = getComputedStyle(el)
      // A closed disclosure's contents are reached by opening it (its summary is checked instead).
      const folded = !!el.closest('details:not([open])') && !el.closest('summary')
      return b.width > 0 && b.height > 0 && s.visibility !== 'hidden' && !folded && !el.closest('[inert], [aria-hidden=true]')
    }
    const name = (el: Element) =>
      `${el.tagName.toLowerCase()}${el.getAttribute('type') ? `[type=${el.getAttribute('type')}]` : ''}${el.getAttribute('tabindex') ? `[tabindex=${el.getAttribute('tabindex')}]` : ''} "${(el.getAttribute('aria-label') || el.textContent || el.getAttribute('name') || el.getAttribute('title') || '').trim().replace(/\s+/g, ' ').slice(0, 40)}"`
    const roving = '[role=grid], [role=listbox], [role=radiogroup], [role=menu], [role=menubar], [role=tablist], [role=tree], [role=table], [cmdk-list]'
    for (const el of document.querySelectorAll<HTMLElement>('[data-kb-id]')) {
      if (!shown(el) || (el as HTMLButtonElement).disabled || el.getAttribute('type') === 'hidden') continue
      if (el.tabIndex < 0 && el.closest(roving)) continue
      // A box given tabindex -1 only to take focus from a script (a scroll area, a dialog) is no control.
      const control = el.matches('a[href], button, input, select, textarea, summary, [role]')
      if (!control && el.tabIndex < 0) continue
      // One stop per radio group: the browser lands on the checked (or first) radio only.
      if (el instanceof HTMLInputElement && el.type === 'radio') {
        const group = [...document.querySelectorAll<HTMLInputElement>(`input[type=radio][name="${CSS.escape(el.name)}"]`)]
        if (group.some((r) => reachedIds.includes(r.dataset.kbId!))) continue
      }
      if (!reachedIds.includes(el.dataset.kbId!)) out.push(`not reached by Tab: ${name(el)}`)
    }
    for (const el of document.querySelectorAll<HTMLElement>('main *, nav *, header *')) {
      if (!shown(el) || getComputedStyle(el).cursor !== 'pointer') continue
      if (el.closest('a[href], button, input, select, textarea, summary, label, [tabindex]')) continue
      out.push(`pressable but not focusable: ${name(el)}`)
    }
    return [...new Set(out)]
  }, [...reached])
}
