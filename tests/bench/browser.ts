// The console as a person meets it, in headless Chromium: a list page from navigation to its first
// rows, a list scrolled to its end (the longest frame on the way), and the palette from the key to
// its first search result. Bounded: a few runs each, every wait capped.
import { chromium, type Page } from 'playwright-core'

export interface BrowserTimed {
  name: string
  ms: number[]
}

const RUNS = 5
const WAIT = { timeout: 30_000 }
// A body row with content (the virtual rows show "Loading…" until their window arrives).
const FIRST_ROW = '[role="rowgroup"] + [role="rowgroup"] [role="row"] a, [role="rowgroup"] + [role="rowgroup"] [role="row"] [role="cell"]:not(:has-text("Loading"))'

/** Records every animation frame's length from now until `stop()`. */
async function watchFrames(page: Page) {
  await page.evaluate(() => {
    const w = window as unknown as { __frames: number[]; __framing: boolean }
    w.__frames = []
    w.__framing = true
    let last = performance.now()
    const tick = (t: number) => {
      w.__frames.push(t - last)
      last = t
      if (w.__framing) requestAnimationFrame(tick)
    }
    requestAnimationFrame(tick)
  })
  return async () =>
    page.evaluate(() => {
      const w = window as unknown as { __frames: number[]; __framing: boolean }
      w.__framing = false
      return Math.max(0, ...w.__frames.slice(1))
    })
}

export async function benchBrowser(url: string, cookie: string): Promise<BrowserTimed[]> {
  const browser = await chromium.launch({ executablePath: '/usr/bin/chromium', args: ['--no-sandbox'] })
  const out: BrowserTimed[] = []
  try {
    const context = await browser.newContext({ viewport: { width: 1440, height: 900 } })
    const [name, value] = cookie.split('=')
    await context.addCookies([{ name, value, url }])
    const page = await context.newPage()

    for (const [label, path] of [
      ['Detectors', '/devices'],
      ['Events', '/events'],
    ] as const) {
      const ms: number[] = []
      for (let i = 0; i < RUNS; i++) {
        await page.goto('about:blank')
        const t = performance.now()
        await page.goto(url + path)
        await page.locator(FIRST_ROW).first().waitFor(WAIT)
        ms.push(performance.now() - t)
      }
      out.push({ name: `browser ${label}: navigation to first rows`, ms })
    }

    for (const [label, path] of [
      ['Detectors', '/devices'],
      ['Events', '/events'],
    ] as const) {
      const frames: number[] = []
      const reach: number[] = []
      for (let i = 0; i < 3; i++) {
        await page.goto(url + path)
        await page.locator(FIRST_ROW).first().waitFor(WAIT)
        const box = page.locator('[role="table"]').locator('xpath=..')
        const stop = await watchFrames(page)
        const t = performance.now()
        // A drag of the scroll bar to the bottom: the last rows' window is fetched and shown.
        await box.evaluate((el) => el.scrollTo({ top: el.scrollHeight }))
        await page.waitForFunction(
          () => {
            const rows = [...document.querySelectorAll('[role="row"][aria-rowindex]')]
            const table = document.querySelector('[role="table"]')
            const last = Number(table?.getAttribute('aria-rowcount'))
            return rows.some((r) => Number(r.getAttribute('aria-rowindex')) === last && !r.textContent?.includes('Loading'))
          },
          undefined,
          WAIT,
        )
        reach.push(performance.now() - t)
        frames.push(await stop())
      }
      out.push({ name: `browser ${label}: scroll to the end, last rows shown`, ms: reach })
      out.push({ name: `browser ${label}: scroll to the end, longest frame`, ms: frames })
    }

    const palette: number[] = []
    await page.goto(url + '/devices')
    await page.locator(FIRST_ROW).first().waitFor(WAIT)
    for (let i = 0; i < RUNS; i++) {
      const word = ['rtu', 'harbor', 'main', 'ahu', 'mall'][i]
      const t = performance.now()
      await page.keyboard.press('Control+k')
      await page.locator('[cmdk-input]').fill(word)
      await page.locator('[cmdk-item][data-value^="/"]').first().waitFor(WAIT)
      palette.push(performance.now() - t)
      await page.keyboard.press('Escape')
      await page.locator('[cmdk-input]').waitFor({ state: 'detached', timeout: 5_000 }).catch(() => undefined)
    }
    out.push({ name: 'browser palette: open to first result', ms: palette })
  } finally {
    await browser.close()
  }
  return out
}
