import { and, asc, count, desc, eq, isNull, max, sql } from 'drizzle-orm'
import type { CapacityUnit } from '~/domain/vocabulary'
import type { Role } from '~/domain/permissions'
import { writeAudit } from '../audit'
import { writeTx, type Db } from '../db'
import { apiTokens, sessions, users } from '../schema'
import { revokeSessionsOf } from '../sessions'

export class Refusal extends Error {}

export function listUsers(db: Db) {
  const seen = db
    .select({ userId: sessions.userId, lastSeenAt: max(sessions.lastSeenAt).as('last_seen_at') })
    .from(sessions)
    .groupBy(sessions.userId)
    .as('seen')
  return db
    .select({
      id: users.id,
      email: users.email,
      name: users.name,
      role: users.role,
      active: users.active,
      regions: users.regions,
      dailyCapacity: users.dailyCapacity,
      capacityUnit: users.capacityUnit,
      createdAt: users.createdAt,
      lastSeenAt: seen.lastSeenAt,
    })
    .from(users)
    .leftJoin(seen, eq(seen.userId, users.id))
    .orderBy(desc(users.active), asc(users.name))
    .all()
}

const getUser = (db: Db, id: number) =>
  db.select({ id: users.id, email: users.email, name: users.name, role: users.role, active: users.active }).from(users).where(eq(users.id, id)).get()

const activeAdmins = (db: Db) =>
  db
    .select({ n: count() })
    .from(users)
    .where(and(eq(users.role, 'admin'), eq(users.active, true)))
    .get()!.n

const now = () => new Date().toISOString()

export function inviteUser(db: Db, actorId: number, o: { email: string; name: string; role: Role }) {
  return writeTx(db, () => {
    // Addresses compare without case; the builder has no lower().
    if (db.select({ id: users.id }).from(users).where(eq(sql`lower(${users.email})`, o.email)).get()) {
      throw new Refusal(`${o.email} already has an account.`)
    }
    const { id } = db.insert(users).values({ email: o.email, name: o.name, role: o.role, active: true }).returning({ id: users.id }).get()
    writeAudit(db, { actorId, action: 'user.invite', entity: 'user', entityId: id, after: o })
    return id
  })
}

export function changeRole(db: Db, actorId: number, userId: number, role: Role) {
  writeTx(db, () => {
    const before = getUser(db, userId)
    if (!before) throw new Refusal('That user no longer exists.')
    if (before.role === role) return
    if (before.role === 'admin' && before.active && activeAdmins(db) <= 1) {
      throw new Refusal('This is the last active administrator; make someone else an administrator first.')
    }
    db.update(users).set({ role }).where(eq(users.id, userId)).run()
    writeAudit(db, { actorId, action: 'user.change-role', entity: 'user', entityId: userId, before: { role: before.role }, after: { role } })
    revokeSessionsOf(db, userId)
  })
}

export function setActive(db: Db, actorId: number, userId: number, active: boolean) {
  writeTx(db, () => {
    const before = getUser(db, userId)
    if (!before) throw new Refusal('That user no longer exists.')
    if (before.active === active) return
    if (!active && before.role === 'admin' && activeAdmins(db) <= 1) {
      throw new Refusal('This is the last active administrator and cannot be deactivated.')
    }
    db.update(users).set({ active }).where(eq(users.id, userId)).run()
    if (!active) {
      revokeSessionsOf(db, userId)
      db.update(apiTokens)
        .set({ revokedAt: now() })
        .where(and(eq(apiTokens.userId, userId), isNull(apiTokens.revokedAt)))
        .run()
    }
    writeAudit(db, { actorId, action: active ? 'user.reactivate' : 'user.deactivate', entity: 'user', entityId: userId, before: { active: before.active }, after: { active } })
  })
}

export interface Workload {
  regions: string[]
  dailyCapacity: number | null
  capacityUnit: CapacityUnit
}

/** A technician's regions and daily capacity; the audit entry keeps only the fields that changed. */
export function setWorkload(db: Db, actorId: number, userId: number, w: Workload) {
  return writeTx(db, () => {
    const before = db
      .select({ role: users.role, regions: users.regions, dailyCapacity: users.dailyCapacity, capacityUnit: users.capacityUnit })
      .from(users)
      .where(eq(users.id, userId))
      .get()
    if (!before) throw new Refusal('That user no longer exists.')
    if (before.role !== 'technician') throw new Refusal('Regions and daily capacity are kept for technicians only.')
    const next = { regions: w.regions.join(',') || null, dailyCapacity: w.dailyCapacity, capacityUnit: w.capacityUnit }
    const was = { regions: before.regions, dailyCapacity: before.dailyCapacity, capacityUnit: before.capacityUnit }
    const changed = (Object.keys(next) as Array<keyof typeof next>).filter((k) => next[k] !== was[k])
    if (changed.length === 0) return false
    db.update(users).set(next).where(eq(users.id, userId)).run()
    const pick = (o: Record<string, unknown>) => Object.fromEntries(changed.map((k) => [k, o[k]]))
    writeAudit(db, { actorId, action: 'user.update', entity: 'user', entityId: userId, before: pick(was), after: pick(next) })
    return true
  })
}
