import { describe, expect, it } from 'vitest'
import { DEMO_EMAIL, useSeededServer } from '#tests/setup/fixture'
import { sessionCookieFor, userIdByEmail } from '#tests/setup/sessions'
import { signInAs } from '#tests/setup/sign-in-browser'

const PHONE = { width: 390, height: 844 }

describe('editing a site on a phone', () => {
  const t = useSeededServer('small', { browser: true })

  it('shows a field error beside its field, saves the monitoring account, and shows a conflict with the other person’s values', async () => {
    const db = t.data.db.$client
    const site = db.prepare('select id, name, monitoring_account as account from sites where monitoring_company_id is not null order by id limit 1').get() as {
      id: number
      name: string
      account: string | null
    }
    const context = await t.browser.newContext({ viewport: PHONE, isMobile: true, hasTouch: true })
    const page = await context.newPage()
    await signInAs(page, t.server.url, DEMO_EMAIL.office, `/sites/${site.id}`)
    await page.getByRole('link', { name: /Edit site/ }).click()
    await page.waitForURL(`**/sites/${site.id}/edit`)

    const account = page.getByLabel('Monitoring account number')
    await account.fill('AC-7781')
    const region = page.getByLabel('Region')
    await region.fill('Oregon')
    // A delay past what NFPA 72 gives for reporting is a caution shown as it is typed, not a refusal.
    await page.getByLabel(/Agreed reporting delay/).fill('300')
    await expect.poll(() => page.getByText(/verify with the AHJ/).count()).toBe(1)
    await page.getByRole('button', { name: 'Save changes' }).click()

    // The message sits under the field it is about, is read with it, and the field takes the focus.
    const message = 'Enter the ISO 3166-2 code, such as US-OR or CA-ON'
    await expect.poll(() => region.getAttribute('aria-invalid')).toBe('true')
    const describedBy = (await region.getAttribute('aria-describedby'))!.split(' ')
    const errorId = await page.locator('span', { hasText: new RegExp(`^!${message}$`) }).getAttribute('id')
    expect(describedBy).toContain(errorId)
    expect(await region.evaluate((el) => el === document.activeElement)).toBe(true)
    const [fieldBox, errorBox] = [await region.boundingBox(), await page.locator(`[id="${errorId}"]`).boundingBox()]
    expect(errorBox!.y).toBeGreaterThan(fieldBox!.y + fieldBox!.height - 1)
    expect(errorBox!.y - (fieldBox!.y + fieldBox!.height)).toBeLessThan(48)
    expect(errorBox!.x + errorBox!.width).toBeLessThanOrEqual(PHONE.width)
    expect(await page.evaluate(() => document.documentElement.scrollWidth)).toBeLessThanOrEqual(PHONE.width)
    expect(db.prepare('select monitoring_account from sites where id = ?').pluck().get(site.id)).toBe(site.account)

    await region.fill('US-OR')
    await page.getByLabel(/Agreed reporting delay/).fill('0')
    await page.getByRole('button', { name: 'Save changes' }).click()
    await page.waitForURL(`**/sites/${site.id}`)
    await expect.poll(() => page.getByText('AC-7781').evaluateAll((els) => els.some((e) => (e as HTMLElement).offsetParent !== null))).toBe(true)
    expect(db.prepare('select monitoring_account as account, region from sites where id = ?').get(site.id)).toEqual({ account: 'AC-7781', region: 'US-OR' })

    // Someone saves in between: the late save is refused, their value shown beside ours, and theirs loaded on request.
    await page.goto(`${t.server.url}/sites/${site.id}/edit`)
    const lead = await sessionCookieFor(t.data.db, userIdByEmail(t.data.db, DEMO_EMAIL.lead))
    const version = db.prepare('select version from sites where id = ?').pluck().get(site.id)
    const other = await fetch(`${t.server.url}/api/sites/${site.id}`, {
      method: 'PATCH',
      headers: { Cookie: lead.cookie, 'Content-Type': 'application/json', Origin: t.server.url },
      body: JSON.stringify({ version, monitoringAccount: 'AC-9900' }),
    })
    expect(other.status).toBe(200)
    await account.fill('AC-1234')
    await page.getByRole('button', { name: 'Save changes' }).click()
    const conflict = page.getByRole('alert').filter({ hasText: 'Not saved' })
    await conflict.waitFor()
    const row = conflict.getByRole('row', { name: /Monitoring account number/ })
    expect(await row.getByRole('cell').allTextContents()).toEqual(['AC-9900', 'AC-1234'])
    expect(db.prepare('select monitoring_account from sites where id = ?').pluck().get(site.id)).toBe('AC-9900')
    await conflict.getByRole('button', { name: 'Load the saved version' }).click()
    await expect.poll(() => account.inputValue()).toBe('AC-9900')
    expect(await conflict.count()).toBe(0)
    await context.close()
  })
})
