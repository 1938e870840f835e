// How the monitoring company of a site wants to hear of work before it starts: what a technician needs
// at the unit, before anything is powered down or tripped.
import { eq, sql } from 'drizzle-orm'
import type { Db } from '../db'
import { monitoringCompanies, sites } from '../schema'
import { perDb } from './statements'

const statements = perDb((db: Db) => ({
  terms: db
    .select({
      name: monitoringCompanies.name,
      phone: monitoringCompanies.phone,
      email: monitoringCompanies.email,
      method: monitoringCompanies.notifyMethod,
      leadMinutes: monitoringCompanies.notifyLeadMinutes,
      hours: monitoringCompanies.hours,
      account: sites.monitoringAccount,
    })
    .from(sites)
    .innerJoin(monitoringCompanies, eq(monitoringCompanies.id, sites.monitoringCompanyId))
    .where(eq(sites.id, sql.placeholder('siteId')))
    .prepare(),
}))

/** The site's monitoring company and its terms for notice, or null when none is on record. */
export function noticeTermsOfSite(db: Db, siteId: number) {
  return statements(db).terms.get({ siteId }) ?? null
}
