import { afterAll, describe, expect, it } from 'vitest'
import { checkDatabase } from '~/.server/db-check'
import { reasonCounts } from '~/.server/lists/triage'
import { applyEdit } from '~/.server/repos/record-edits'
import { addYears } from '~/domain/dates'
import { REASON_CODES } from '~/domain/vocabulary'
import { userIdByEmail } from '#tests/setup/sessions'
import { seededDb, TEST_TODAY } from '#tests/setup/temp-db'

describe('the site’s nuisance-alarm record and the schedule it allows', () => {
  const data = seededDb('small')
  afterAll(() => data.cleanup())
  const q = data.db.$client

  it('turning the record off takes a 5-year detector back to every other year, re-derived in the same edit', () => {
    // A detector whose last three sensitivity tests were in range, at a site that keeps the record:
    // its next test is 5 years after the last (NFPA 72 14.4.5.3.2). Without the record: 2 years.
    const d = q
      .prepare(
        `select d.id, d.site_id as siteId, d.last_sensitivity_on as last, d.next_sensitivity_on as next, s.version
         from detectors d join sites s on s.id = d.site_id
         where s.keeps_nuisance_records = 1 and d.sensitivity_streak >= 3 order by d.id limit 1`,
      )
      .get() as { id: number; siteId: number; last: string; next: string; version: number }
    expect(d).toBeDefined()
    expect(d.next).toBe(addYears(d.last, 5))

    const office = userIdByEmail(data.db, 'office@ductkeeper.test')
    const off = applyEdit(data.db, 'site', office, d.siteId, { version: d.version, keepsNuisanceRecords: false }, TEST_TODAY)
    expect(off.status).toBe(200)
    expect(q.prepare('select next_sensitivity_on from detectors where id = ?').pluck().get(d.id)).toBe(addYears(d.last, 2))
    const audit = q.prepare("select before, after from audit_log where entity = 'site' and entity_id = ? order by id desc limit 1").get(String(d.siteId)) as { before: string; after: string }
    expect(JSON.parse(audit.before)).toEqual({ keepsNuisanceRecords: true })
    expect(JSON.parse(audit.after)).toEqual({ keepsNuisanceRecords: false })

    const on = applyEdit(data.db, 'site', office, d.siteId, { version: d.version + 1, keepsNuisanceRecords: 'on' }, TEST_TODAY)
    expect(on.status).toBe(200)
    expect(q.prepare('select next_sensitivity_on from detectors where id = ?').pluck().get(d.id)).toBe(d.next)
    expect(checkDatabase(data.db, TEST_TODAY, { integrity: 'none' }).disagreements).toEqual([])
  })

  it('the queue’s count of every reason matches the detectors carrying it, kept or counted', () => {
    const counts = reasonCounts(data.db)
    for (const code of REASON_CODES) {
      const n = q.prepare("select count(*) from detectors where risk_reasons like ? and acknowledged_at is null").pluck().get(`%,${code},%`)
      expect(counts[code], code).toBe(n)
    }
    expect(counts['supervision-unproven']).toBeGreaterThan(0)
  })
})
