import type { Page } from 'playwright-core'
import { describe, expect, it } from 'vitest'
import { useSeededServer } from '#tests/setup/fixture'
import { sessionCookieFor, userIdByEmail } from '#tests/setup/sessions'

describe('a keyboard-only session in Chromium', () => {
  const t = useSeededServer('small', { browser: true })

  async function signedInPage(): Promise<Page> {
    const { cookie } = await sessionCookieFor(t.data.db, userIdByEmail(t.data.db, 'lead@ductkeeper.test'))
    const context = await t.browser.newContext()
    const [name, ...value] = cookie.split('=')
    await context.addCookies([{ name, value: value.join('='), domain: '127.0.0.1', path: '/' }])
    const page = await context.newPage()
    // Count every pointer event the page sees: the session must not need one.
    await page.addInitScript(() => {
      ;(window as unknown as { __pointer: number }).__pointer = 0
      for (const type of ['mousedown', 'pointerdown', 'mouseup', 'contextmenu']) {
        window.addEventListener(type, () => ((window as unknown as { __pointer: number }).__pointer += 1), true)
      }
    })
    return page
  }

  it('palette → site by address → detector → back → overdue filter → select three → help', async () => {
    const site = t.data.db.$client.prepare("select s.id, s.name, s.street from sites s where exists (select 1 from detectors d where d.site_id = s.id) order by s.id limit 1").get() as { id: number; name: string; street: string }
    const detector = t.data.db.$client.prepare('select id, tag from detectors where site_id = ? order by id limit 1').get(site.id) as { id: number; tag: string }
    const streetWord = site.street.split(' ')[1] // "4897 Birchmont Drive" → "Birchmont"
    const page = await signedInPage()
    await page.goto(`${t.server.url}/triage`, { waitUntil: 'networkidle' })

    const palette = page.getByRole('dialog', { name: 'Command palette' })
    // Typing starts once the palette's input has focus, as a person would see the caret first.
    const openPalette = async () => {
      await page.keyboard.press('Control+k')
      await palette.waitFor()
      await page.waitForFunction(() => document.activeElement?.hasAttribute('cmdk-input'))
    }
    // Arrow down to an entry (results arrive as you type), then open it with Enter.
    const choose = async (value: string) => {
      await palette.locator(`[cmdk-item][data-value="${value}"]`).waitFor()
      for (let i = 0; i < 20; i++) {
        const selected = palette.locator('[cmdk-item][data-selected="true"]')
        if ((await selected.count()) > 0 && (await selected.getAttribute('data-value')) === value) break
        await page.keyboard.press('ArrowDown')
      }
      await page.keyboard.press('Enter')
    }
    await openPalette()
    await page.keyboard.type(`${streetWord} ${site.name.split(' ')[0]}`)
    await palette.getByRole('option', { name: new RegExp(site.name.replace(/[.*+?^${}()|[\]\\]/g, '\\$&')) }).first().waitFor()
    await choose(`/sites/${site.id}`)
    await page.waitForURL(`${t.server.url}/sites/${site.id}`)
    await page.getByRole('heading', { level: 1 }).waitFor()

    await openPalette()
    await page.keyboard.type(`${detector.tag} ${streetWord}`)
    await palette.locator(`[cmdk-item][data-value="/devices/${detector.id}"]`).waitFor()
    await choose(`/devices/${detector.id}`)
    await page.waitForURL(`${t.server.url}/devices/${detector.id}`)
    await page.getByRole('heading', { level: 1, name: detector.tag }).waitFor()

    // The browser's own Back (Alt+Left) is browser chrome, which a headless page never receives:
    // ask the browser for the same history step.
    await page.goBack()
    await page.waitForURL(`${t.server.url}/sites/${site.id}`)

    // g then d: the detectors list; / to the filter; Tab to the "Due" filter; choose Overdue.
    await page.keyboard.press('g')
    await page.keyboard.press('d')
    await page.waitForURL(`${t.server.url}/devices`)
    await page.getByRole('searchbox').waitFor()
    await page.keyboard.press('/')
    await expect(page.evaluate(() => document.activeElement?.getAttribute('type'))).resolves.toBe('search')
    await page.keyboard.press('Tab') // State
    await page.keyboard.press('Tab') // Due
    await expect(page.evaluate(() => document.activeElement?.closest('label')?.textContent)).resolves.toContain('Due')
    await page.keyboard.press('ArrowDown')
    await page.waitForURL(/due=overdue/)
    await page.keyboard.press('Escape')
    const overdue = (t.data.db.$client.prepare("select count(*) as n from detectors where due_status = 'overdue'").get() as { n: number }).n
    await page.getByRole('status').filter({ hasText: `${overdue} detectors` }).waitFor()

    await page.keyboard.press('x')
    await page.keyboard.press('j')
    await page.keyboard.press('x')
    await page.keyboard.press('j')
    await page.keyboard.press('x')
    await expect(page.locator('[role=row][aria-selected=true]').count()).resolves.toBe(3)
    await page.getByRole('status').filter({ hasText: '3 selected' }).waitFor()

    await page.keyboard.press('?')
    const help = page.getByRole('dialog', { name: 'Keyboard shortcuts' })
    await help.waitFor()
    await expect(help.innerText()).resolves.toContain('Select or unselect the row')
    await page.keyboard.press('Escape')
    await expect(help.count()).resolves.toBe(0)

    await expect(page.evaluate(() => (window as unknown as { __pointer: number }).__pointer)).resolves.toBe(0)
    await page.context().close()
  })

  it('never fires a shortcut while typing in a field', async () => {
    const page = await signedInPage()
    await page.goto(`${t.server.url}/devices`, { waitUntil: 'networkidle' })
    await page.keyboard.press('/')
    await page.keyboard.type('gx?j')
    await expect(page.evaluate(() => (document.activeElement as HTMLInputElement).value)).resolves.toBe('gx?j')
    await expect(page.getByRole('dialog').count()).resolves.toBe(0)
    expect(page.url()).toContain('/devices')
    await page.context().close()
  })
})
