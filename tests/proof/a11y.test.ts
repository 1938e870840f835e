import { describe, expect, it } from 'vitest'
import { a11yStops, axeProblems, keyboardGaps, pageAs, WIDTHS, type A11yStop } from '#tests/setup/a11y'
import { useSeededServer } from '#tests/setup/fixture'

// Every main page and the visit form, at phone and desk width: nothing axe rates serious or critical,
// and every control reachable from the keyboard.
describe('accessibility of every main page', () => {
  const t = useSeededServer('small', { browser: true })
  let stops: A11yStop[] = []

  it.each(Object.keys(WIDTHS) as Array<keyof typeof WIDTHS>)('at %s width', async (width) => {
    if (!stops.length) stops = a11yStops(t.data.db)
    const found: string[] = []
    for (const stop of stops) {
      const { context, page } = await pageAs(t.browser, t.data.db, stop.as, width)
      const res = await page.goto(t.server.url + stop.path, { waitUntil: 'load' })
      if (res?.status() !== 200) found.push(`${stop.path}: answered ${res?.status()}`)
      await page.locator('h1').first().waitFor()
      await page.waitForLoadState('networkidle')
      for (const p of await axeProblems(page)) found.push(`${stop.path}: ${p}`)
      for (const p of await keyboardGaps(page)) found.push(`${stop.path}: ${p}`)
      await context.close()
    }
    expect(found).toEqual([])
  }, 600_000)
})
