import { and, asc, desc, eq, gt, gte, inArray, like, lt, notInArray, or, type SQL } from 'drizzle-orm'
import { AUDIT_KINDS, ROUTINE_SESSION_ACTIONS, groupEntries, idsToLookUp, type AuditKind, type AuditRow } from '~/domain/audit-sentences'
import { emptyNamed, type BulkRecord, type Named } from '~/domain/audit-values'
import type { Db } from '../db'
import { apiTokens, attachments, auditLog, bulkChanges, customers, detectors, savedViews, sites, units, users, visits } from '../schema'

export interface AuditFilter {
  kind?: AuditKind
  actor?: number
  /** Instants (UTC ISO) bounding the entries' time: from inclusive, until exclusive. */
  from?: string
  until?: string
  /** Routine sign-ins and sign-outs are left out unless asked for. */
  signIns: boolean
}

export interface AuditPageQuery extends AuditFilter {
  /** Keyset: entries older than this id (the next page), or newer than it (the previous page). */
  before?: number
  after?: number
  limit: number
}

const columns = {
  id: auditLog.id,
  at: auditLog.at,
  actorId: auditLog.actorId,
  action: auditLog.action,
  entity: auditLog.entity,
  entityId: auditLog.entityId,
  before: auditLog.before,
  after: auditLog.after,
}

function conditions(f: AuditFilter): SQL[] {
  const out: SQL[] = []
  if (f.kind) {
    const prefixes = AUDIT_KINDS.find((k) => k.key === f.kind)!.prefixes
    out.push(or(...prefixes.map((p) => like(auditLog.action, `${p}%`)))!)
  }
  if (!f.signIns && f.kind !== 'sign-ins') out.push(notInArray(auditLog.action, ROUTINE_SESSION_ACTIONS))
  if (f.actor) out.push(eq(auditLog.actorId, f.actor))
  if (f.from) out.push(gte(auditLog.at, f.from))
  if (f.until) out.push(lt(auditLog.at, f.until))
  return out
}

// A group of entries written together (3 detectors acknowledged at once) should not be cut in two by
// a page's end: the rows just past it are read to finish the group. Bounded, like a bulk change.
const GROUP_TAIL = 500

/**
 * One page of the log, newest first, paged by id (keyset) so a page costs the same at any depth.
 * Returns the raw entries grouped, and the ids to continue from in each direction.
 */
export function auditPage(db: Db, q: AuditPageQuery) {
  const base = conditions(q)
  const newer = q.after !== undefined
  const keyset = newer ? gt(auditLog.id, q.after!) : q.before !== undefined ? lt(auditLog.id, q.before) : undefined
  let rows = db
    .select(columns)
    .from(auditLog)
    .where(and(...base, keyset))
    .orderBy(newer ? asc(auditLog.id) : desc(auditLog.id))
    .limit(q.limit + 1)
    .all() as AuditRow[]
  const more = rows.length > q.limit
  rows = rows.slice(0, q.limit)
  if (newer) rows.reverse()
  if (!newer && more && rows.length) {
    const tail = db
      .select(columns)
      .from(auditLog)
      .where(and(...base, lt(auditLog.id, rows.at(-1)!.id)))
      .orderBy(desc(auditLog.id))
      .limit(GROUP_TAIL)
      .all() as AuditRow[]
    const lastGroup = groupEntries([...rows.slice(-1), ...tail])[0]
    rows.push(...lastGroup.slice(1))
  }
  const groups = groupEntries(rows)
  const oldest = rows.at(-1)?.id
  const newest = rows[0]?.id
  const hasOlder = newer ? rows.length > 0 && exists(db, and(...base, lt(auditLog.id, oldest!))) : more && oldest !== undefined && exists(db, and(...base, lt(auditLog.id, oldest)))
  const hasNewer = newest !== undefined && (newer ? more : q.before !== undefined && exists(db, and(...base, gt(auditLog.id, newest))))
  return { groups, olderThan: hasOlder ? oldest! : null, newerThan: hasNewer ? newest! : null }
}

const exists = (db: Db, where: SQL | undefined) => db.select({ id: auditLog.id }).from(auditLog).where(where).limit(1).get() !== undefined

const list = (s: Set<number>) => [...s]

/**
 * Names for every id the page's entries mention, one query per kind of record (at most ten a
 * page, however many entries), never one per entry.
 */
export function namesFor(db: Db, rows: AuditRow[]): Named {
  const want = idsToLookUp(rows)
  const names = emptyNamed()
  if (want.users.size) {
    for (const u of db.select({ id: users.id, name: users.name, email: users.email }).from(users).where(inArray(users.id, list(want.users))).all()) names.users[u.id] = u
  }
  if (want.detectors.size) {
    for (const d of db
      .select({ id: detectors.id, tag: detectors.tag, siteId: detectors.siteId, siteName: sites.name })
      .from(detectors)
      .innerJoin(sites, eq(sites.id, detectors.siteId))
      .where(inArray(detectors.id, list(want.detectors)))
      .all())
      names.detectors[d.id] = d
  }
  if (want.visits.size) {
    for (const v of db
      .select({ id: visits.id, scheduledOn: visits.scheduledOn, kind: visits.kind, siteId: visits.siteId, siteName: sites.name })
      .from(visits)
      .innerJoin(sites, eq(sites.id, visits.siteId))
      .where(inArray(visits.id, list(want.visits)))
      .all())
      names.visits[v.id] = v
  }
  if (want.units.size) {
    for (const u of db
      .select({ id: units.id, tag: units.tag, siteId: units.siteId, siteName: sites.name })
      .from(units)
      .innerJoin(sites, eq(sites.id, units.siteId))
      .where(inArray(units.id, list(want.units)))
      .all())
      names.units[u.id] = u
  }
  if (want.sites.size) {
    for (const s of db.select({ id: sites.id, name: sites.name }).from(sites).where(inArray(sites.id, list(want.sites))).all()) names.sites[s.id] = s
  }
  if (want.customers.size) {
    for (const c of db.select({ id: customers.id, name: customers.name }).from(customers).where(inArray(customers.id, list(want.customers))).all()) names.customers[c.id] = c
  }
  if (want.tokens.size) {
    for (const t of db.select({ id: apiTokens.id, name: apiTokens.name, prefix: apiTokens.prefix }).from(apiTokens).where(inArray(apiTokens.id, list(want.tokens))).all()) names.tokens[t.id] = t
  }
  if (want.views.size) {
    for (const v of db.select({ id: savedViews.id, name: savedViews.name, page: savedViews.page }).from(savedViews).where(inArray(savedViews.id, list(want.views))).all()) names.views[v.id] = v
  }
  if (want.attachments.size) {
    for (const a of db.select({ id: attachments.id, fileName: attachments.fileName, visitId: attachments.visitId }).from(attachments).where(inArray(attachments.id, list(want.attachments))).all()) names.attachments[a.id] = a
  }
  if (want.bulk.size) {
    for (const b of db.select({ id: bulkChanges.id, records: bulkChanges.records, undoneAt: bulkChanges.undoneAt }).from(bulkChanges).where(inArray(bulkChanges.id, list(want.bulk))).all()) {
      names.bulk[b.id] = { records: Array.isArray(b.records) ? (b.records as BulkRecord[]) : [], undoneAt: b.undoneAt }
    }
  }
  return names
}

/** Everyone who could appear as the author of an entry, for the person filter. */
export function auditPeople(db: Db) {
  return db.select({ id: users.id, name: users.name }).from(users).orderBy(asc(users.name)).all()
}
