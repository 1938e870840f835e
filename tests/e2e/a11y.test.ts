import { describe, expect, it } from 'vitest'
import { axeProblems, keyboardGaps, pageAs, visitFormPath, WIDTHS } from '#tests/setup/a11y'
import { useSeededServer } from '#tests/setup/fixture'

// One page here, the one used on a roof: the visit form. `npm run test:proof` checks every main page.
describe('the visit form, for accessibility', () => {
  const t = useSeededServer('small', { browser: true })

  it.each(Object.keys(WIDTHS) as Array<keyof typeof WIDTHS>)('at %s width: nothing serious or critical to axe, every control on the keyboard', async (width) => {
    const path = visitFormPath(t.data.db)
    const { context, page } = await pageAs(t.browser, t.data.db, 'technician', width)
    expect((await page.goto(t.server.url + path, { waitUntil: 'load' }))?.status()).toBe(200)
    await page.getByRole('navigation', { name: 'Detectors on this visit' }).waitFor()
    expect(await axeProblems(page)).toEqual([])
    expect(await keyboardGaps(page)).toEqual([])
    await context.close()
  })
})
