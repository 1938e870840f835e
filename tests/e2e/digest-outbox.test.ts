import type { Browser } from 'playwright-core'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { launchBrowser } from '#tests/setup/browser'
import { DEMO_EMAIL } from '#tests/setup/fixture'
import { startServer } from '#tests/setup/server'
import { userIdByEmail } from '#tests/setup/sessions'
import { signInAs } from '#tests/setup/sign-in-browser'
import { seededDb, TEST_TODAY } from '#tests/setup/temp-db'

describe('the weekly digest from the outbox, in Chromium', () => {
  let server: Awaited<ReturnType<typeof startServer>>
  let data: ReturnType<typeof seededDb>
  let browser: Browser
  beforeAll(async () => {
    data = seededDb('small')
    // The schedule must not send on its own while the page is driven.
    server = await startServer(data.path, { DUCTKEEPER_JOBS: 'off' })
    browser = await launchBrowser()
  })
  afterAll(async () => {
    await browser?.close()
    await server?.stop()
    data?.cleanup()
  })
  const one = (q: string, ...args: unknown[]) => data.db.$client.prepare(q).pluck().get(...args)

  it('an admin previews a digest, sends it now, and reads it in the outbox as the recipient would', async () => {
    const context = await browser.newContext({ viewport: { width: 1440, height: 900 } })
    const page = await context.newPage()
    await signInAs(page, server.url, DEMO_EMAIL.admin, '/admin/outbox')
    const managerId = userIdByEmail(data.db, DEMO_EMAIL.manager)
    const name = one('select name from users where id = ?', managerId) as string
    const overdue = one(
      `select count(*) from detectors where state <> 'out-of-service' and (next_visual_on < @d or next_functional_on < @d or next_sensitivity_on < @d or next_cleaning_on < @d)`,
      { d: TEST_TODAY },
    ) as number

    const person = page.getByRole('listitem').filter({ hasText: DEMO_EMAIL.manager })
    await person.getByRole('link', { name: 'Preview' }).click()
    await page.getByRole('heading', { name: /^Preview \(not sent\): Ductkeeper weekly digest/ }).waitFor()
    const preview = page.frameLocator('iframe[title="The message as HTML"]')
    await preview.getByText(`For ${name}:`).waitFor()
    expect(one('select count(*) from email_outbox')).toBe(0)

    await person.getByRole('button', { name: 'Send now' }).click()
    await page.getByText(`${name}'s digest for this week sent.`).waitFor()
    const sent = data.db.$client.prepare(`select id, subject, status, provider_id as providerId from email_outbox where recipient_user_id = ? and kind = 'digest'`).get(managerId) as {
      id: number
      subject: string
      status: string
      providerId: string
    }
    expect(sent.status).toBe('sent')
    expect(sent.providerId).toMatch(/^fake-/)
    // This week's figures are kept for next week's arrows.
    expect(JSON.parse(one('select figures from digest_snapshots where user_id = ?', managerId) as string).overdue).toBe(overdue)

    // The message list shows it sent; opening it shows the HTML as the recipient's mail client would.
    const line = page.getByRole('listitem').filter({ has: page.getByRole('link', { name: sent.subject }) })
    await line.getByText('sent', { exact: true }).waitFor()
    await line.getByRole('link', { name: sent.subject }).click()
    await page.waitForURL(new RegExp(`message=${sent.id}`))
    await page.getByRole('heading', { name: sent.subject, exact: true }).waitFor()
    const mail = page.frameLocator('iframe[title="The message as HTML"]')
    await mail.getByRole('heading', { name: `Week to ${TEST_TODAY}` }).waitFor()
    await mail.getByText(`For ${name}:`).waitFor()
    const overdueLink = mail.getByRole('link', { name: String(overdue), exact: true }).first()
    expect(await overdueLink.getAttribute('href')).toBe(`${server.url}/devices?due=overdue`)
    expect(await mail.getByRole('link', { name: 'Settings' }).getAttribute('href')).toBe(`${server.url}/settings`)
    // Shown, never run: the frame is sandboxed with nothing allowed.
    expect(await page.locator('iframe[title="The message as HTML"]').getAttribute('sandbox')).toBe('')
    await expect(page.locator('pre').textContent()).resolves.toContain('Detectors overdue')

    // Sending again this week sends nothing new.
    await page.getByRole('listitem').filter({ hasText: DEMO_EMAIL.manager }).getByRole('button', { name: 'Send now' }).click()
    await page.getByText(`${name}'s digest for this week (already in the outbox) already on its way.`).waitFor()
    expect(one(`select count(*) from email_outbox where recipient_user_id = ?`, managerId)).toBe(1)
    await context.close()
  })
})
