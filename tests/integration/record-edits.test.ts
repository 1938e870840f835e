import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { checkDatabase } from '~/.server/db-check'
import { applyEdit, editableRecord } from '~/.server/repos/record-edits'
import { startServer } from '#tests/setup/server'
import { sessionCookieFor, userIdByEmail } from '#tests/setup/sessions'
import { seededDb, TEST_TODAY } from '#tests/setup/temp-db'

describe('editing records: checks, versions, roles, audit and derived facts', () => {
  let server: Awaited<ReturnType<typeof startServer>>
  let data: ReturnType<typeof seededDb>
  const cookie: Record<string, string> = {}

  beforeAll(async () => {
    data = seededDb('small')
    server = await startServer(data.path)
    for (const who of ['lead', 'office', 'tech', 'manager', 'admin']) cookie[who] = (await sessionCookieFor(data.db, userIdByEmail(data.db, `${who}@ductkeeper.test`))).cookie
  })
  afterAll(async () => {
    await server?.stop()
    data?.cleanup()
  })

  const q = () => data.db.$client
  const patch = (path: string, body: unknown, who = 'office') =>
    fetch(`${server.url}${path}`, { method: 'PATCH', headers: { Cookie: cookie[who], Origin: server.url, 'Content-Type': 'application/json' }, body: JSON.stringify(body) })
  const version = (table: string, id: number) => (q().prepare(`select version from ${table} where id = ?`).get(id) as { version: number }).version
  const audits = (entity: string, id: number) =>
    q()
      .prepare('select action, actor_id as actorId, before, after from audit_log where entity = ? and entity_id = ? order by id')
      .all(entity, String(id)) as Array<{ action: string; actorId: number; before: string; after: string }>
  const disagreements = () => checkDatabase(data.db, TEST_TODAY, { integrity: 'none' }).disagreements

  it('answers 400 with a message per field and writes nothing', async () => {
    const site = 2
    const before = q().prepare('select * from sites where id = ?').get(site)
    const res = await patch(`/api/sites/${site}`, { version: version('sites', site), region: 'Oregon', timeZone: 'Mars/Olympus', delayPolicySeconds: -5, name: '  ' })
    expect(res.status).toBe(400)
    const body = await res.json()
    expect(body.fieldErrors).toEqual({
      name: 'Enter the site’s name',
      region: 'Enter the ISO 3166-2 code, such as US-OR or CA-ON',
      timeZone: 'Enter a time zone name such as America/Chicago',
      delayPolicySeconds: 'At least 0 s',
    })
    expect(q().prepare('select * from sites where id = ?').get(site)).toEqual(before)

    // Cross-field rules: a round duct needs its diameter; a range's top is not below its bottom.
    const unit = (q().prepare("select id from units where duct_shape = 'rectangular' order by id limit 1").get() as { id: number }).id
    const round = await patch(`/api/units/${unit}`, { version: version('units', unit), ductShape: 'round' })
    expect(round.status).toBe(400)
    expect((await round.json()).fieldErrors).toEqual({ ductDiameterIn: 'A round duct needs its diameter' })
    const detector = 1
    const ranges = await patch(`/api/devices/${detector}`, { version: version('detectors', detector), velocityMinFpm: 900, velocityMaxFpm: '500', conductorAwg: 20 })
    expect(ranges.status).toBe(400)
    expect((await ranges.json()).fieldErrors).toEqual({ conductorAwg: 'Choose 18, 16, 14, 12 AWG', velocityMaxFpm: 'The highest velocity must be at least the lowest' })
    const email = await patch('/api/customers/1', { version: version('customers', 1), contactEmail: 'not an address' })
    expect((await email.json()).fieldErrors).toEqual({ contactEmail: 'Enter a valid e-mail address, or leave it blank' })
    const unknown = await patch('/api/customers/1', { version: version('customers', 1), nickname: 'x' })
    expect(unknown.status).toBe(400)
    expect((await unknown.json()).error).toBe('Unknown field: nickname.')
    const noVersion = await patch('/api/customers/1', { name: 'x' })
    expect(noVersion.status).toBe(400)
    expect((await noVersion.json()).fieldErrors).toEqual({ version: 'Send the version you read' })
    expect(audits('customer', 1)).toEqual([])
  })

  it('saves a change on the version read: 200 with the new record, version bumped, audit with the changed fields only', async () => {
    const site = 3
    const old = q().prepare('select monitoring_account as account, version from sites where id = ?').get(site) as { account: string; version: number }
    const res = await patch(`/api/sites/${site}`, { version: old.version, monitoringAccount: 'AC-445566' })
    expect(res.status).toBe(200)
    const body = await res.json()
    expect(body.record).toMatchObject({ monitoringAccount: 'AC-445566', version: old.version + 1 })
    expect(body.cautions).toEqual([])
    expect(q().prepare('select monitoring_account as account, version from sites where id = ?').get(site)).toEqual({ account: 'AC-445566', version: old.version + 1 })
    const [entry] = audits('site', site)
    expect(entry.action).toBe('site.update')
    expect(entry.actorId).toBe(userIdByEmail(data.db, 'office@ductkeeper.test'))
    expect(JSON.parse(entry.before)).toEqual({ monitoringAccount: old.account })
    expect(JSON.parse(entry.after)).toEqual({ monitoringAccount: 'AC-445566' })

    // The same values again change nothing: no version bump, no audit entry.
    const same = await patch(`/api/sites/${site}`, { version: old.version + 1, monitoringAccount: 'AC-445566' })
    expect(same.status).toBe(200)
    expect(version('sites', site)).toBe(old.version + 1)
    expect(audits('site', site)).toHaveLength(1)

    // A form post (as the page sends) reads the same way, a ticked box as true.
    const unit = (q().prepare('select id from units where shared_plenum = 0 order by id limit 1').get() as { id: number }).id
    const form = new URLSearchParams({ version: String(version('units', unit)), sharedPlenum: 'false' })
    form.append('sharedPlenum', 'on')
    const posted = await fetch(`${server.url}/api/units/${unit}`, { method: 'POST', headers: { Cookie: cookie.lead, Origin: server.url, 'Content-Type': 'application/x-www-form-urlencoded' }, body: form })
    expect(posted.status).toBe(200)
    expect(JSON.parse(audits('unit', unit)[0].after)).toEqual({ sharedPlenum: true })
  })

  it('refuses a save on an older version with 409 and the current record, saying who saved', async () => {
    const customer = 2
    const v = version('customers', customer)
    expect((await patch(`/api/customers/${customer}`, { version: v, contactName: 'Iris Palomar' }, 'lead')).status).toBe(200)
    const late = await patch(`/api/customers/${customer}`, { version: v, contactName: 'Someone Else' })
    expect(late.status).toBe(409)
    const body = await late.json()
    expect(body.record).toMatchObject({ contactName: 'Iris Palomar', version: v + 1 })
    expect(body.savedBy.name).toBe(q().prepare("select name from users where email = 'lead@ductkeeper.test'").pluck().get())
    expect(body.error).toContain(`you had version ${v}, it is now ${v + 1}`)
    expect(q().prepare('select contact_name from customers where id = ?').pluck().get(customer)).toBe('Iris Palomar')
  })

  it('refuses technicians and managers (403) on the API and the edit pages, and lets lead and admin in', async () => {
    for (const who of ['tech', 'manager']) {
      const res = await patch('/api/sites/1', { version: version('sites', 1), monitoringAccount: 'X-1' }, who)
      expect(res.status).toBe(403)
      const page = await fetch(`${server.url}/sites/1/edit`, { headers: { Cookie: cookie[who] }, redirect: 'manual' })
      expect(page.status).toBe(403)
    }
    expect(audits('site', 1)).toEqual([])
    for (const who of ['lead', 'admin']) {
      const page = await fetch(`${server.url}/devices/1/edit`, { headers: { Cookie: cookie[who] } })
      expect(page.status).toBe(200)
      expect(await page.text()).toContain('Fire alarm loop, as installed')
    }
  })

  it('re-derives the site’s detectors when its delay policy changes, and flags a delay past 200 s', async () => {
    const site = q()
      .prepare(
        `select s.id, s.delay_policy_seconds as policy from sites s where (select count(*) from detectors d where d.site_id = s.id and d.delay_seconds = s.delay_policy_seconds) >= 2 order by s.id desc limit 1`,
      )
      .get() as { id: number; policy: number }
    const agreeing = q().prepare("select id from detectors where site_id = ? and delay_seconds = ? and delay_agreement = 'agree' order by id").pluck().all(site.id, site.policy) as number[]
    expect(agreeing.length).toBeGreaterThanOrEqual(2)
    const res = await patch(`/api/sites/${site.id}`, { version: version('sites', site.id), delayPolicySeconds: site.policy + 240 })
    expect(res.status).toBe(200)
    const body = await res.json()
    expect(body.cautions).toEqual([{ field: 'delayPolicySeconds', message: expect.stringMatching(/NFPA 72.*verify with the AHJ/) }])
    const after = q().prepare(`select delay_agreement as a, risk_reasons as r from detectors where id in (${agreeing.join(',')})`).all() as Array<{ a: string; r: string }>
    expect(after.every((d) => d.a === 'disagree' && d.r.includes(',delay-disagrees,'))).toBe(true)
    expect(disagreements()).toEqual([])

    // One detector set to the new policy agrees again; its version moves, its site and customer stay its unit's.
    const d = agreeing[0]
    const seenBefore = q().prepare('select delay_observed_on from detectors where id = ?').pluck().get(d)
    const set = await patch(`/api/devices/${d}`, { version: version('detectors', d), delaySeconds: site.policy + 240, delayObservedOn: '2026-06-10' })
    expect(set.status).toBe(200)
    expect(q().prepare('select delay_agreement as a, delay_observed_on as o from detectors where id = ?').get(d)).toEqual({ a: 'agree', o: '2026-06-10' })
    expect(
      q()
        .prepare('select count(*) from detectors d join units u on u.id = d.unit_id join sites s on s.id = u.site_id where d.id = ? and d.site_id = s.id and d.customer_id = s.customer_id')
        .pluck()
        .get(d),
    ).toBe(1)
    expect(JSON.parse(audits('detector', d)[0].before)).toEqual({ delaySeconds: site.policy, delayObservedOn: seenBefore })
    expect(JSON.parse(audits('detector', d)[0].after)).toEqual({ delaySeconds: site.policy + 240, delayObservedOn: '2026-06-10' })
    expect(disagreements()).toEqual([])
  })

  it('keeps a detector model’s listed ranges on a version counted from its edits', () => {
    const office = userIdByEmail(data.db, 'office@ductkeeper.test')
    const model = editableRecord(data.db, 'model', 1)!
    expect(model.version).toBe(1)
    const saved = applyEdit(data.db, 'model', office, 1, { version: 1, sensitivityLowPctFt: '0.8', sensitivityHighPctFt: '2.5' }, TEST_TODAY)
    expect(saved.status).toBe(200)
    expect(q().prepare('select sensitivity_low_pct_ft as lo, sensitivity_high_pct_ft as hi from detector_models where id = 1').get()).toEqual({ lo: 0.8, hi: 2.5 })
    expect(applyEdit(data.db, 'model', office, 1, { version: 1, sensitivityHighPctFt: '3' }, TEST_TODAY).status).toBe(409)
    const backwards = applyEdit(data.db, 'model', office, 1, { version: 2, sensitivityLowPctFt: '3' }, TEST_TODAY)
    expect(backwards).toMatchObject({ status: 400, fieldErrors: { sensitivityHighPctFt: 'The high end must be above the low end' } })
  })

  it('records detectors at each storey on a unit: the unit stops showing the per-storey line as missing', async () => {
    // IMC 606.2.3 / NFPA 90A (2012) 6.4.2.1: a detector at each storey of a return serving two or more
    // storeys in systems over 15,000 cfm.
    const unit = (q().prepare("select id from units where kind = 'ahu' order by id limit 1").get() as { id: number }).id
    const perStorey = async () => {
      const body = await (await fetch(`${server.url}/api/units/${unit}`, { headers: { Cookie: cookie.office } })).json()
      return body.requirements.items.find((i: { location: string }) => i.location === 'return-each-storey')?.status
    }
    const set = await patch(`/api/units/${unit}`, { version: version('units', unit), storeysServed: 3, returnCfm: 20_000, supplyCfm: 22_000, areaDetection: false, storeyReturnDetectors: '' })
    expect(set.status, await set.clone().text()).toBe(200)
    expect(await perStorey()).toBe('missing')
    const fitted = await patch(`/api/units/${unit}`, { version: version('units', unit), storeyReturnDetectors: '3' })
    expect(fitted.status).toBe(200)
    expect(q().prepare('select storey_return_detectors as n from units where id = ?').get(unit)).toEqual({ n: 3 })
    expect(await perStorey()).toBe('present')
    // Editing another field keeps the count (the form carries every field of the record).
    expect((await patch(`/api/units/${unit}`, { version: version('units', unit), location: 'Mechanical room 2' })).status).toBe(200)
    expect(q().prepare('select storey_return_detectors as n from units where id = ?').get(unit)).toEqual({ n: 3 })
    const bad = await patch(`/api/units/${unit}`, { version: version('units', unit), storeyReturnDetectors: '-1' })
    expect(bad.status).toBe(400)
    expect((await bad.json()).fieldErrors.storeyReturnDetectors).toMatch(/At least 0/)
  })

  it('judges a detector’s loop by its recorded EOL tolerance and panel alarm threshold, re-derived on saving', async () => {
    const d = q()
      .prepare("select id, eol_ohms as eol from detectors where loop_verdict = 'pass' and alarm_terminal = 'NO' and eol_placement = 'through-supervisory' order by id limit 1")
      .get() as { id: number; eol: number }
    // A normal reading 8 % over the resistor: outside a 5 % part (common practice), inside a 10 % one.
    const visit = (q().prepare('select visit_id as v from readings where detector_id = ? order by id desc limit 1').get(d.id) as { v: number }).v
    q().prepare("update readings set value = ? where detector_id = ? and visit_id = ? and kind = 'loop-normal'").run(Math.round(d.eol * 1.08), d.id, visit)
    const tolerant = await patch(`/api/devices/${d.id}`, { version: version('detectors', d.id), eolTolerancePct: '10', alarmThresholdOhms: '150' })
    expect(tolerant.status, await tolerant.clone().text()).toBe(200)
    expect(q().prepare('select eol_tolerance_pct as t, alarm_threshold_ohms as a, loop_verdict as v from detectors where id = ?').get(d.id)).toEqual({ t: 10, a: 150, v: 'pass' })
    const strict = await patch(`/api/devices/${d.id}`, { version: version('detectors', d.id), eolTolerancePct: '' })
    expect(strict.status).toBe(200)
    expect(q().prepare('select eol_tolerance_pct as t, loop_verdict as v from detectors where id = ?').get(d.id)).toEqual({ t: null, v: 'fail' })
    expect((await patch(`/api/devices/${d.id}`, { version: version('detectors', d.id), eolTolerancePct: '40' })).status).toBe(400)
    expect(disagreements()).toEqual([])
  })
})
