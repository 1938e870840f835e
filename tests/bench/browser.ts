// The console as a person meets it, in headless Chromium: Detectors and Events from a full load, from
// a move through the rail and (Detectors) from a filter to their first rows, a list scrolled to its end
// (the longest frame on the way), and the palette from the key to its first search result. Bounded: a
// few runs each, every wait capped.
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
export async function hydrated(page: Page) {
  await page.waitForLoadState('load')
  await page.waitForFunction(() => Object.keys(document.body).some((k) => k.startsWith('__react')), undefined, WAIT)
  await page.waitForLoadState('networkidle')
}

/**
 * Installed in every page before its own scripts: notes the moment (page clock) the first real row
 * is in the document, and the moment of the last click or change. Timed in the page, so the figures
 * leave out the driver's own polling. `__rowsWant` narrows it to an address containing that text; a
 * list still showing the previous filter's rows (dimmed) does not count.
 */
export const ROW_CLOCK = `(() => {
  window.__rowsAt = null
  window.__actAt = null
  const ready = () => {
    const want = window.__rowsWant
    if (want && !(location.pathname + location.search).includes(want)) return false
    const group = document.querySelectorAll('[role="rowgroup"]')[1]
    if (group && group.className.includes('opacity-60')) return false
    return [...document.querySelectorAll('[role="row"][aria-rowindex]')].some((r) => r.textContent.trim() && !r.textContent.includes('Loading'))
  }
  const check = () => { if (window.__rowsAt === null && ready()) window.__rowsAt = performance.now() }
  new MutationObserver(check).observe(document, { childList: true, subtree: true, characterData: true, attributes: true, attributeFilter: ['class'] })
  addEventListener('click', () => { window.__actAt = performance.now() }, true)
  addEventListener('change', () => { window.__actAt = performance.now() }, true)
})()`

/** Starts the row clock over, for rows at an address containing `want`. */
const expectRows = (page: Page, want: string) => page.evaluate(`window.__rowsAt = null; window.__rowsWant = ${JSON.stringify(want)}`)
const rowsSeen = async (page: Page) => {
  await page.waitForFunction('window.__rowsAt !== null', undefined, WAIT)
  return page.evaluate<{ rows: number; act: number | null }>('({ rows: window.__rowsAt, act: window.__actAt })')
}

/**
 * Detectors and Events: a full load to the first real row (page clock from the navigation's start),
 * a move through the rail from another page to the first row, and a filter chosen on Detectors to
 * its first row. The page's context must carry ROW_CLOCK.
 */
export async function listTimes(page: Page, url: string, runs: number, part: (name: string, fn: () => Promise<void>) => Promise<void>): Promise<BrowserTimed[]> {
  const out: BrowserTimed[] = []
  for (const [label, path] of [
    ['Detectors', '/devices'],
    ['Events', '/events'],
  ] as const) {
    await part(`${label} full load`, async () => {
      const ms: number[] = []
      for (let i = 0; i < runs; i++) {
        await page.goto('about:blank')
        await page.goto(url + path, { waitUntil: 'commit' })
        ms.push((await rowsSeen(page)).rows)
        await page.waitForLoadState('load')
      }
      out.push({ name: `browser ${label}: full load to first rows`, ms })
    })
    await part(`${label} client move`, async () => {
      const ms: number[] = []
      for (let i = 0; i < runs; i++) {
        await page.goto(url + '/overview')
        await hydrated(page)
        await expectRows(page, path)
        await page.locator(`nav a[href="${path}"]`).first().click()
        const seen = await rowsSeen(page)
        ms.push(seen.rows - (seen.act ?? seen.rows))
      }
      out.push({ name: `browser ${label}: client move to first rows`, ms })
    })
  }
  await part('Detectors filter', async () => {
    const ms: number[] = []
    for (let i = 0; i < runs; i++) {
      await page.goto(url + '/devices')
      await hydrated(page)
      // States every scale holds detectors in (a fleet may have none in alarm at the time).
      const state = ['trouble', 'supervisory', 'out-of-service'][i % 3]
      // Timed by the driver: from the choice to the first row of the narrowed list, no longer dimmed.
      const t = performance.now()
      await page.locator('label', { hasText: /^State/ }).locator('select').selectOption(state)
      await page.waitForFunction(
        (want) => {
          const group = document.querySelectorAll('[role="rowgroup"]')[1]
          const row = document.querySelector('[role="row"][aria-rowindex="2"]')
          return location.search.includes(`state=${want}`) && !!group && !group.className.includes('opacity-60') && !!row?.textContent && !row.textContent.includes('Loading')
        },
        state,
        { ...WAIT, polling: 'raf' },
      )
      ms.push(performance.now() - t)
    }
    out.push({ name: 'browser Detectors: filter chosen to first rows', ms })
  })
  return out
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
    await context.addInitScript(ROW_CLOCK)
    for (const t of await listTimes(page, url, RUNS, part)) out.push(t)

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
