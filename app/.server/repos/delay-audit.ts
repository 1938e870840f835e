import { stringify } from 'csv-stringify/sync'
import { z } from 'zod'
import { delayLimitCaution, TROUBLE_REPORTING_SECONDS } from '~/domain/delay-audit'
import { DELAY_AGREEMENTS, type DelayAgreement } from '~/domain/vocabulary'
import { adviceFor, type AuditCounts } from '../bulk/actions/delay-audit'
import { safeCell } from '../csv/cells'
import type { Db } from '../db'

export const SITES_PER_PAGE = 25

export const auditQuery = z.object({
  outcome: z.enum(DELAY_AGREEMENTS).catch('disagree'),
  page: z.coerce.number().int().min(1).max(100_000).catch(1),
})

export interface AuditDetector {
  id: number
  tag: string
  delaySeconds: number | null
  delayObservedOn: string | null
  advice: string
}

export interface AuditSite {
  id: number
  name: string
  city: string
  region: string
  policySeconds: number
  count: number
  detectors: AuditDetector[]
}

export interface AuditPage {
  counts: AuditCounts & { total: number }
  limitSeconds: number
  outcome: DelayAgreement
  page: number
  pages: number
  siteCount: number
  sites: AuditSite[]
}

/** The whole fleet's counts per outcome, from the stored agreement (grouped on its index). */
export function fleetCounts(db: Db): AuditCounts & { total: number } {
  const q = db.$client
  // Raw SQL: count(*) per outcome, and the two counts past the NFPA 72 limit.
  const rows = q.prepare('select delay_agreement as outcome, count(*) as n from detectors group by delay_agreement').all() as Array<{ outcome: DelayAgreement; n: number }>
  const counts = { agree: 0, disagree: 0, unknown: 0, total: 0, policiesBeyond: 0, settingsBeyond: 0 }
  for (const r of rows) {
    counts[r.outcome] = r.n
    counts.total += r.n
  }
  counts.policiesBeyond = (q.prepare(`select count(*) as n from sites where delay_policy_seconds > ?`).get(TROUBLE_REPORTING_SECONDS) as { n: number }).n
  counts.settingsBeyond = (q.prepare(`select count(*) as n from detectors where delay_seconds > ?`).get(TROUBLE_REPORTING_SECONDS) as { n: number }).n
  return counts
}

/** One page of the sites holding detectors with the outcome, each with those detectors. */
export function auditPage(db: Db, outcome: DelayAgreement, page: number): AuditPage {
  const q = db.$client
  const counts = fleetCounts(db)
  const siteCount = (q.prepare('select count(distinct site_id) as n from detectors where delay_agreement = ?').get(outcome) as { n: number }).n
  const pages = Math.max(1, Math.ceil(siteCount / SITES_PER_PAGE))
  const at = Math.min(page, pages)
  const sites = q
    .prepare(
      `select s.id, s.name, s.city, s.region, s.delay_policy_seconds as policySeconds, g.n as count
         from (select site_id, count(*) as n from detectors where delay_agreement = ? group by site_id) g
         join sites s on s.id = g.site_id order by s.name, s.id limit ? offset ?`,
    )
    .all(outcome, SITES_PER_PAGE, (at - 1) * SITES_PER_PAGE) as Array<Omit<AuditSite, 'detectors'>>
  const bySite = new Map<number, AuditSite>(sites.map((s) => [s.id, { ...s, detectors: [] }]))
  if (sites.length) {
    const rows = q
      .prepare(
        `select id, site_id as siteId, tag, delay_seconds as delaySeconds, delay_observed_on as delayObservedOn from detectors
          where delay_agreement = ? and site_id in (${sites.map(() => '?').join(',')}) order by tag, id`,
      )
      .all(outcome, ...sites.map((s) => s.id)) as Array<Omit<AuditDetector, 'advice'> & { siteId: number }>
    for (const r of rows) {
      const s = bySite.get(r.siteId)!
      s.detectors.push({ id: r.id, tag: r.tag, delaySeconds: r.delaySeconds, delayObservedOn: r.delayObservedOn, advice: adviceFor(r.delaySeconds, s.policySeconds) })
    }
  }
  return { counts, limitSeconds: TROUBLE_REPORTING_SECONDS, outcome, page: at, pages, siteCount, sites: [...bySite.values()] }
}

/** The detectors with the outcome as CSV, text cells guarded against spreadsheet formulas. */
export function auditCsv(db: Db, outcome: DelayAgreement): string {
  const rows = db.$client
    .prepare(
      `select c.name as customer, s.name as site, s.city, s.region, d.tag, d.serial, d.delay_seconds as delaySeconds,
              s.delay_policy_seconds as policySeconds, d.delay_observed_on as observedOn, d.delay_agreement as outcome
         from detectors d join sites s on s.id = d.site_id join customers c on c.id = d.customer_id
        where d.delay_agreement = ? order by s.name, s.id, d.tag, d.id`,
    )
    .all(outcome) as Array<{ customer: string; site: string; city: string; region: string; tag: string; serial: string | null; delaySeconds: number | null; policySeconds: number; observedOn: string | null; outcome: string }>
  const records = rows.map((r) => {
    return [
      r.customer,
      r.site,
      r.city,
      r.region,
      r.tag,
      r.serial ?? '',
      r.delaySeconds ?? '',
      r.policySeconds,
      r.observedOn ?? '',
      r.outcome,
      adviceFor(r.delaySeconds, r.policySeconds),
      delayLimitCaution(r) ?? '',
    ].map((v) => (typeof v === 'string' ? safeCell(v) : v))
  })
  const header = ['customer', 'site', 'city', 'region', 'tag', 'serial', 'delay_seconds', 'policy_seconds', 'observed_on', 'outcome', 'advice', 'caution']
  return stringify([header, ...records])
}
