// The console as a person meets it, in headless Chromium: a list page from navigation to its first
// rows, a list scrolled to its end (the longest frame on the way), and the palette from the key to
// its first search result. Bounded: a few runs each, every wait capped.
import { chromium, type Page } from 'playwright-core'

export interface BrowserTimed {
  name: string
  ms: number[]
}

const RUNS = 5
const WAIT = { timeout: 60_000 }
/**
 * Waits for a body row with its content (a virtual row shows "Loading…" until its window arrives),
 * on the page at `path` when given (a client-side move changes the address once the page renders).
 */
async function firstRow(page: Page, path?: string) {
  await page.waitForFunction(
    (at) =>
      (!at || location.pathname === at) &&
      [...document.querySelectorAll('[role="row"][aria-rowindex]')].some((r) => r.textContent?.trim() && !r.textContent.includes('Loading')),
    path,
    { ...WAIT, polling: 'raf' },
  )
}

/** Waits until the scripts have taken over the page (React marks its root), and the network is quiet. */
async function hydrated(page: Page) {
  await page.waitForLoadState('load')
  await page.waitForFunction(() => Object.keys(document.body).some((k) => k.startsWith('__react')), undefined, WAIT)
  await page.waitForLoadState('networkidle')
}

/**
 * Records every animation frame's length from now until `stop()`. Sent as text: tsx names the
 * functions it compiles with a helper the page does not have.
 */
async function watchFrames(page: Page) {
  await page.evaluate(`(() => {
    window.__frames = []
    window.__framing = true
    let last = performance.now()
    const tick = (t) => {
      window.__frames.push(t - last)
      last = t
      if (window.__framing) requestAnimationFrame(tick)
    }
    requestAnimationFrame(tick)
  })()`)
  return async () => page.evaluate<number>(`(() => { window.__framing = false; return Math.max(0, ...window.__frames.slice(1)) })()`)
}

export async function benchBrowser(url: string, cookie: string): Promise<BrowserTimed[]> {
  const browser = await chromium.launch({
    executablePath: '/usr/bin/chromium',
    args: ['--no-sandbox'],
  })
  const out: BrowserTimed[] = []
  try {
    const context = await browser.newContext({
      viewport: { width: 1440, height: 900 },
    })
    const [name, value] = cookie.split('=')
    await context.addCookies([{ name, value, url }])
    const page = await context.newPage()

    // Each part keeps what it measured if a later one fails.
    const part = async (name: string, fn: () => Promise<void>) =>
      fn().catch((e: unknown) => console.error(`browser ${name} failed: ${String(e).split('\n')[0]}`))
    for (const [label, path] of [
      ['Detectors', '/devices'],
      ['Events', '/events'],
    ] as const) {
      // A full page load: from asking for the address to the first real row in the document, whether
      // it came in the server's HTML or was fetched after the scripts ran.
      await part(`${label} full load`, async () => {
        const ms: number[] = []
        for (let i = 0; i < RUNS; i++) {
          await page.goto('about:blank')
          const t = performance.now()
          await page.goto(url + path, { waitUntil: 'commit' })
          await firstRow(page)
          ms.push(performance.now() - t)
          await page.waitForLoadState('load')
        }
        out.push({ name: `browser ${label}: full load to first rows`, ms })
      })
      // A move inside the running console: the rail's link from another page to the list's first row.
      await part(`${label} client move`, async () => {
        const ms: number[] = []
        for (let i = 0; i < RUNS; i++) {
          await page.goto(url + '/overview')
          await hydrated(page)
          const t = performance.now()
          await page.locator(`nav a[href="${path}"]`).first().click()
          await firstRow(page, path)
          ms.push(performance.now() - t)
        }
        out.push({ name: `browser ${label}: client move to first rows`, ms })
      })
    }

    await part('Detectors filter', async () => {
      // A filter chosen on the page: from the choice to the first row of the narrowed list.
      const ms: number[] = []
      for (let i = 0; i < RUNS; i++) {
        await page.goto(url + '/devices')
        await firstRow(page)
        await hydrated(page)
        const state = ['trouble', 'alarm', 'supervisory', 'out-of-service', 'trouble'][i]
        const t = performance.now()
        await page.locator('label', { hasText: /^State/ }).locator('select').selectOption(state)
        await page.waitForFunction(
          (want) => {
            const group = document.querySelectorAll('[role="rowgroup"]')[1]
            const row = document.querySelector('[role="row"][aria-rowindex="2"]')
            return location.search.includes(`state=${want}`) && group && !group.className.includes('opacity-60') && !!row?.textContent && !row.textContent.includes('Loading')
          },
          state,
          WAIT,
        )
        ms.push(performance.now() - t)
      }
      out.push({ name: 'browser Detectors: filter chosen to first rows', ms })
    })

    for (const [label, path] of [
      ['Detectors', '/devices'],
      ['Events', '/events'],
    ] as const)
      await part(`${label} scroll`, async () => {
        const frames: number[] = []
        const reach: number[] = []
        for (let i = 0; i < 3; i++) {
          await page.goto(url + path)
          await firstRow(page)
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
        out.push({
          name: `browser ${label}: scroll to the end, last rows shown`,
          ms: reach,
        })
        out.push({
          name: `browser ${label}: scroll to the end, longest frame`,
          ms: frames,
        })
      })

    await part('palette', async () => {
      const palette: number[] = []
      await page.goto(url + '/devices')
      await firstRow(page)
      for (let i = 0; i < RUNS; i++) {
        const word = ['rtu', 'harbor', 'main', 'ahu', 'mall'][i]
        const t = performance.now()
        await page.keyboard.press('Control+k')
        await page.locator('[cmdk-input]').fill(word)
        await page.locator('[cmdk-item][data-value^="/"]').first().waitFor(WAIT)
        palette.push(performance.now() - t)
        await page.keyboard.press('Escape')
        await page
          .locator('[cmdk-input]')
          .waitFor({ state: 'detached', timeout: 5_000 })
          .catch(() => undefined)
      }
      out.push({ name: 'browser palette: open to first result', ms: palette })
    })
  } finally {
    await browser.close()
  }
  return out
}
