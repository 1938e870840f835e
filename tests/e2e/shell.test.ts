import { describe, expect, it } from 'vitest'
import { useSeededServer } from '#tests/setup/fixture'
import { signInAs } from '#tests/setup/sign-in-browser'

describe('app shell in Chromium', () => {
  const t = useSeededServer('small', { browser: true })

  it('renders the overview with real figures in the shipped fonts', async () => {
    const page = await t.browser.newPage()
    const fontRequests: string[] = []
    page.on('request', (r) => r.url().match(/\.woff2?$/) && fontRequests.push(r.url()))
    await signInAs(page, t.server.url, 'lead@ductkeeper.test')
    const errors: string[] = []
    page.on('console', (m) => m.type() === 'error' && errors.push(m.text()))
    await page.goto(`${t.server.url}/overview`, { waitUntil: 'networkidle' })

    await expect(page.getByRole('heading', { name: 'Overview', level: 1 }).isVisible()).resolves.toBe(true)
    await expect(page.getByRole('navigation', { name: 'Sections' }).isVisible()).resolves.toBe(true)
    const detectors = t.data.db.$client.prepare('select count(*) as n from detectors').get() as { n: number }
    const figure = page.locator('section[aria-label="Fleet"] div', { hasText: /^Detectors/ }).first()
    await expect(figure.innerText()).resolves.toContain(String(detectors.n))
    await expect(page.getByRole('note', { name: 'Safety caution' }).isVisible()).resolves.toBe(true)

    // The fonts came from the app itself, not a font service, and are in use.
    const fonts = await page.evaluate(async () => {
      await document.fonts.ready
      return {
        inter: document.fonts.check('16px "Inter Variable"'),
        mono: document.fonts.check('16px "JetBrains Mono"'),
        loaded: [...document.fonts].filter((f) => f.status === 'loaded').map((f) => f.family),
        body: getComputedStyle(document.body).fontFamily,
      }
    })
    expect(fonts.body).toContain('Inter Variable')
    expect(fonts.loaded).toEqual(expect.arrayContaining(['Inter Variable', 'JetBrains Mono']))
    expect(fonts.inter && fonts.mono).toBe(true)
    expect(fontRequests.length).toBeGreaterThan(0)
    // The provider's own page uses system fonts; every font file came from the app's origin.
    for (const url of fontRequests) expect(url.startsWith(t.server.url)).toBe(true)
    expect(errors).toEqual([])
    await page.close()
  })
})
