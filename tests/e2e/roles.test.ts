import type { Browser } from 'playwright-core'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { can, ROLE_KEYS, type Role } from '~/domain/permissions'
import { SECTIONS } from '~/utils/sections'
import { launchBrowser } from '#tests/setup/browser'
import { startServer } from '#tests/setup/server'
import { signInAs } from '#tests/setup/sign-in-browser'
import { seededDb } from '#tests/setup/temp-db'

const EMAIL: Record<Role, string> = {
  admin: 'admin@ductkeeper.test',
  lead: 'lead@ductkeeper.test',
  office: 'office@ductkeeper.test',
  technician: 'tech@ductkeeper.test',
  manager: 'manager@ductkeeper.test',
}

describe('each role in Chromium', () => {
  let server: Awaited<ReturnType<typeof startServer>>
  let data: ReturnType<typeof seededDb>
  let browser: Browser
  beforeAll(async () => {
    data = seededDb('small')
    server = await startServer(data.path)
    browser = await launchBrowser()
  })
  afterAll(async () => {
    await browser?.close()
    await server?.stop()
    data?.cleanup()
  })

  it.each(ROLE_KEYS)('%s signs in through the stand-in provider, sees what the role may see, signs out', async (role) => {
    const context = await browser.newContext()
    const page = await context.newPage()
    await signInAs(page, server.url, EMAIL[role])
    const nav = page.getByRole('navigation', { name: 'Sections' })
    for (const s of SECTIONS) {
      const visible = await nav.getByRole('link', { name: s.label, exact: true }).count()
      expect(visible, `${role} ${s.label}`).toBe(can(role, s.capability) ? 1 : 0)
    }
    // A page outside the role answers "not allowed" rather than showing anything.
    const usersPage = await page.goto(`${server.url}/admin/users`)
    expect(usersPage?.status()).toBe(can(role, 'manage:users') ? 200 : 403)
    if (!can(role, 'manage:users')) await expect(page.getByRole('heading', { name: 'Not allowed' }).isVisible()).resolves.toBe(true)

    await page.goto(server.url)
    await page.getByRole('button', { name: 'Sign out' }).click()
    await page.waitForURL(/\/sign-in\?signed-out/)
    await page.getByRole('status').filter({ hasText: 'You are signed out.' }).waitFor()
    await page.goto(server.url)
    await page.waitForURL(/\/sign-in\?returnTo=/)
    await context.close()
  })
})
