import sharp from 'sharp'
import { beforeAll, describe, expect, it } from 'vitest'
import { DEMO_EMAIL, useSeededServer } from '#tests/setup/fixture'
import { sessionCookieFor, userIdByEmail } from '#tests/setup/sessions'
import { signInAs } from '#tests/setup/sign-in-browser'
import { TEST_TODAY } from '#tests/setup/temp-db'

const PHONE = { width: 390, height: 844 }

describe('a visit on a phone', () => {
  const t = useSeededServer('small', { browser: true })
  let visitId = 0
  let siteName = ''
  let companyMethod = ''
  const tags: Record<number, string> = {}

  beforeAll(async () => {
    const db = t.data.db.$client
    const techId = userIdByEmail(t.data.db, DEMO_EMAIL.technician)
    // Two detectors at one monitored site whose recorded loops are right, with no open visit yet.
    const pair = db
      .prepare(
        `select d.id, d.tag, d.site_id as siteId, s.name as siteName, m.notify_method as method
         from detectors d join sites s on s.id = d.site_id join monitoring_companies m on m.id = s.monitoring_company_id
         where d.loop_verdict is not 'fail' and d.alarm_terminal = 'NO' and d.eol_placement = 'through-supervisory'
           and d.heads_fitted = 1 and d.test_station = 'none'
           and not exists (select 1 from visit_detectors vd join visits v on v.id = vd.visit_id
                           where vd.detector_id = d.id and v.status in ('planned', 'notified', 'in-progress'))
           and d.site_id = (select d2.site_id from detectors d2 where d2.loop_verdict is not 'fail' and d2.alarm_terminal = 'NO'
                            and d2.eol_placement = 'through-supervisory' and d2.heads_fitted = 1 and d2.test_station = 'none'
                            group by d2.site_id having count(*) >= 2 order by d2.site_id limit 1)
         order by d.id limit 2`,
      )
      .all() as Array<{ id: number; tag: string; siteId: number; siteName: string; method: string }>
    expect(pair).toHaveLength(2)
    for (const d of pair) tags[d.id] = d.tag
    siteName = pair[0].siteName
    companyMethod = pair[0].method
    const office = await sessionCookieFor(t.data.db, userIdByEmail(t.data.db, DEMO_EMAIL.office))
    const res = await fetch(`${t.server.url}/api/visits`, {
      method: 'POST',
      headers: { Cookie: office.cookie, Origin: t.server.url, 'Content-Type': 'application/json' },
      body: JSON.stringify({
        siteId: pair[0].siteId,
        kind: 'test',
        scheduledOn: TEST_TODAY,
        windowFrom: '08:00',
        windowUntil: '12:00',
        technicianId: techId,
        detectors: pair.map((d) => ({ detectorId: d.id, tasks: ['visual', 'functional'] })),
      }),
    })
    expect(res.status, await res.clone().text()).toBe(201)
    visitId = ((await res.json()) as { visitId: number }).visitId
  })

  it('notice, start, a miswire diagnosed while typing, a fail and a pass, complete; the lead sees the failed test', async () => {
    const context = await t.browser.newContext({ viewport: PHONE, isMobile: true, hasTouch: true })
    const page = await context.newPage()
    await signInAs(page, t.server.url, DEMO_EMAIL.technician)
    // Technicians land on their own day.
    expect(new URL(page.url()).pathname).toBe('/my-day')
    await page.getByRole('link', { name: new RegExp(siteName.replace(/[.*+?^${}()|[\]\\]/g, '\\$&')) }).first().click()
    await page.waitForURL(new RegExp(`/visits/${visitId}$`))

    // Nothing may start before the monitoring company is told.
    const start = page.getByRole('button', { name: 'Start work' })
    await expect(start.isDisabled()).resolves.toBe(true)
    await page.getByText('Start is locked until a notice to the monitoring company is logged.').waitFor()
    // The company's preferred way is chosen already.
    const preferred = page.getByRole('button', { name: new RegExp(`^${{ phone: 'Phone', email: 'E-mail', portal: 'Portal' }[companyMethod]} ★`) })
    await expect(preferred.getAttribute('aria-pressed')).resolves.toBe('true')
    await page.getByLabel('Spoke with').fill('Dana at the desk')
    await page.getByLabel('Confirmation number').fill('C-4471')
    await page.getByRole('group', { name: 'Site management told' }).getByRole('button', { name: 'Yes' }).click()
    await page.getByRole('button', { name: 'Log notice' }).click()
    await page.getByText('Dana at the desk').waitFor()
    await page.getByRole('button', { name: 'Start work' }).click()
    await page.getByRole('heading', { name: 'Record the work' }).waitFor()

    // First detector in roof-walk order: normal reads a short, which a correct loop never does.
    const first = page.locator('article').first()
    const firstTag = (await first.getByRole('heading', { level: 3 }).innerText()).trim()
    const firstId = Number(Object.entries(tags).find(([, tag]) => tag === firstTag)?.[0])
    expect(firstId).toBeGreaterThan(0)
    let saves = 0
    page.on('request', (r) => {
      if (r.method() === 'POST' && r.url().endsWith(`/api/visits/${visitId}`)) saves++
    })
    await first.getByRole('textbox', { name: /^Normal/ }).fill('0.4')
    await first.getByText('Loop does not read as recorded').waitFor()
    await expect(first.locator('[data-finding="alarm-on-nc"]').count()).resolves.toBe(1)
    await expect(first.locator('[data-expected="normal"]').innerText()).resolves.toMatch(/^Expect \d[\d,.]* Ω–\d[\d,.]* Ω$/)
    expect(saves).toBe(0)

    // What is typed survives a reload: it is kept on the phone.
    await page.reload()
    await expect(page.locator('article').first().getByRole('textbox', { name: /^Normal/ }).inputValue()).resolves.toBe('0.4')

    const card = page.locator('article').first()
    await card.getByRole('group', { name: 'Signal at the panel' }).getByRole('button', { name: 'Nothing' }).click()
    await card.getByRole('group', { name: 'Unit shut down' }).getByRole('button', { name: 'No' }).click()
    await card.getByRole('group', { name: 'Reset OK' }).getByRole('button', { name: 'Yes' }).click()
    await card.getByRole('group', { name: 'This detector' }).getByRole('button', { name: 'Fail' }).click()
    // A fail without a reason is refused on the phone, before anything is sent.
    await card.getByRole('button', { name: `Save ${firstTag}` }).click()
    await card.getByRole('alert').filter({ hasText: 'Say why the detector failed' }).waitFor()
    await card.getByLabel('Why it failed (required)').fill('Normal reads a short at the panel: alarm appears wired on NC. Reported to the fire alarm contractor.')
    // A loop reading without who read it at the panel is refused beside that box, before anything is sent.
    await card.getByRole('button', { name: `Save ${firstTag}` }).click()
    const readBy = card.getByRole('textbox', { name: 'Read at the panel by (fire alarm contractor, name and firm)' })
    await card.locator('[data-field-error="loopReadBy"]').filter({ hasText: 'Say who read the loop at the panel' }).waitFor()
    await expect(readBy.getAttribute('aria-invalid')).resolves.toBe('true')
    await expect(readBy.evaluate((el) => el === document.activeElement)).resolves.toBe(true)
    expect(saves).toBe(0)
    await readBy.fill('Ines Varga, Northpoint Alarm Co.')
    await card.getByRole('button', { name: `Save ${firstTag}` }).click()
    await card.getByText(`Saved ${firstTag}.`).waitFor()
    // A photo of the terminals, filed under this detector.
    const photo = await sharp({ create: { width: 64, height: 48, channels: 3, background: '#6a8' } }).jpeg().toBuffer()
    await card.locator('input[type=file]').last().setInputFiles({ name: 'terminals.jpg', mimeType: 'image/jpeg', buffer: photo })
    await card.getByRole('heading', { name: 'Sent from here (1)' }).waitFor()
    expect(t.data.db.$client.prepare('select detector_id as detectorId, content_type as type, thumb_key is not null as thumb from attachments where visit_id = ?').all(visitId)).toEqual([
      { detectorId: firstId, type: 'image/jpeg', thumb: 1 },
    ])

    await page.getByRole('button', { name: 'Next detector' }).click()
    const second = page.locator('article').first()
    const secondTag = (await second.getByRole('heading', { level: 3 }).innerText()).trim()
    expect(secondTag).not.toBe(firstTag)
    await second.getByRole('group', { name: 'Signal at the panel' }).getByRole('button', { name: 'Alarm' }).click()
    await second.getByRole('group', { name: 'Unit shut down' }).getByRole('button', { name: 'Yes' }).click()
    await second.getByRole('group', { name: 'Reset OK' }).getByRole('button', { name: 'Yes' }).click()
    await second.getByRole('group', { name: 'This detector' }).getByRole('button', { name: 'Pass' }).click()
    await second.getByRole('button', { name: `Save ${secondTag}` }).click()
    await second.getByText(`Saved ${secondTag}.`).waitFor()

    await page.getByRole('button', { name: 'Complete visit' }).click()
    await page.getByRole('heading', { name: 'Record the work' }).waitFor({ state: 'detached' })
    await page.getByRole('heading', { name: 'Log the all-clear' }).waitFor()
    await expect(page.locator('main header').getByText('Done').count()).resolves.toBe(1)
    expect(t.data.db.$client.prepare('select status from visits where id = ?').get(visitId)).toEqual({ status: 'done' })
    const results = t.data.db.$client.prepare('select detector_id as id, result, result_reason as reason from visit_detectors where visit_id = ? order by detector_id').all(visitId) as Array<{ id: number; result: string; reason: string | null }>
    expect(Object.fromEntries(results.map((r) => [tags[r.id], r.result]))).toEqual({ [firstTag]: 'fail', [secondTag]: 'pass' })
    expect(results.find((r) => r.id === firstId)?.reason).toMatch(/alarm appears wired on NC/)
    // The drafts are gone from the phone once the visit is complete.
    await expect(page.evaluate(() => Object.keys(localStorage).filter((k) => k.startsWith('dk:visit-draft:')).length)).resolves.toBe(0)
    // Nothing on the page is wider than the phone.
    await expect(page.evaluate(() => document.documentElement.scrollWidth)).resolves.toBeLessThanOrEqual(PHONE.width)
    // The printable record holds the reading typed on the roof and the failure with its reason.
    await page.goto(`${t.server.url}/visits/${visitId}/record`)
    const record = await page.locator('main').innerText()
    expect(record).toContain(firstTag)
    expect(record).toMatch(/0\.4 Ω/)
    expect(record).toContain('alarm appears wired on NC')
    expect(record).toContain('Loop read at the panel by Ines Varga, Northpoint Alarm Co.')
    await context.close()

    const lead = await sessionCookieFor(t.data.db, userIdByEmail(t.data.db, DEMO_EMAIL.lead))
    const res = await fetch(`${t.server.url}/api/triage?reason=failed-test&q=${encodeURIComponent(firstTag)}`, { headers: { Cookie: lead.cookie } })
    expect(res.status).toBe(200)
    const body = (await res.json()) as { rows: Array<{ id: number; reasons: Array<{ code: string }>; followUp: string | null }> }
    const row = body.rows.find((r) => r.id === firstId)
    expect(row?.reasons.map((r) => r.code)).toContain('failed-test')
    // The office's follow-up carries the technician's reason.
    expect(row?.followUp).toMatch(/alarm appears wired on NC/)
  }, 90_000)
})
