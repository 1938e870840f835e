import { describe, expect, it } from 'vitest'
import { DEMO_EMAIL, useSeededServer } from '#tests/setup/fixture'
import { can, ROLE_KEYS, ROLE_LABELS } from '~/domain/permissions'
import { SECTIONS } from '~/utils/sections'
import { signInAs } from '#tests/setup/sign-in-browser'

describe('each role in Chromium', () => {
  const t = useSeededServer('small', { browser: true })

  it.each(ROLE_KEYS)('%s signs in through the stand-in provider, sees what the role may see, signs out', async (role) => {
    const context = await t.browser.newContext()
    const page = await context.newPage()
    await signInAs(page, t.server.url, DEMO_EMAIL[role])
    const nav = page.getByRole('navigation', { name: 'Sections' })
    for (const s of SECTIONS) {
      const visible = await nav.getByRole('link', { name: s.label, exact: true }).count()
      expect(visible, `${role} ${s.label}`).toBe(can(role, s.capability) ? 1 : 0)
    }
    // A page outside the role answers "not allowed" rather than showing anything, inside the console:
    // the menu stays, the sentence says what the role cannot do, and a link leads back home.
    const usersPage = await page.goto(`${t.server.url}/admin/users`)
    expect(usersPage?.status()).toBe(can(role, 'manage:users') ? 200 : 403)
    if (!can(role, 'manage:users')) {
      await expect(page.getByRole('heading', { name: 'Not allowed' }).isVisible()).resolves.toBe(true)
      await expect(nav.isVisible()).resolves.toBe(true)
      await page.getByText(`The ${ROLE_LABELS[role]} role cannot invite people, change their roles or deactivate them.`).waitFor()
      const home = can(role, 'triage:fleet') || can(role, 'schedule:visits') ? 'Triage' : can(role, 'record:work') ? 'My day' : 'Overview'
      await page.getByRole('link', { name: `Back to ${home}` }).click()
      await page.waitForURL((u) => u.pathname === SECTIONS.find((s) => s.label === home)!.to)
    }

    await page.goto(t.server.url)
    await page.getByRole('button', { name: 'Sign out' }).click()
    await page.waitForURL(/\/sign-in\?signed-out/)
    await page.getByRole('status').filter({ hasText: 'You are signed out.' }).waitFor()
    await page.goto(t.server.url)
    await page.waitForURL(/\/sign-in\?returnTo=/)
    await context.close()
  })
})
