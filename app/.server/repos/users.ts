import type { Role } from '~/domain/permissions'
import { writeAudit } from '../audit'
import { writeTx, type Db } from '../db'
import { revokeSessionsOf } from '../sessions'

export interface UserRow {
  id: number
  email: string
  name: string
  role: Role
  active: number
  createdAt: string
  lastSeenAt: string | null
}

export class Refusal extends Error {}

export function listUsers(db: Db): UserRow[] {
  return db.$client
    .prepare(
      `select u.id, u.email, u.name, u.role, u.active, u.created_at as createdAt,
              (select max(last_seen_at) from sessions s where s.user_id = u.id) as lastSeenAt
       from users u order by u.active desc, u.name`,
    )
    .all() as UserRow[]
}

const getUser = (db: Db, id: number) =>
  db.$client.prepare('select id, email, name, role, active from users where id = ?').get(id) as
    | Pick<UserRow, 'id' | 'email' | 'name' | 'role' | 'active'>
    | undefined

const activeAdmins = (db: Db) =>
  (db.$client.prepare("select count(*) as n from users where role = 'admin' and active = 1").get() as { n: number }).n

export function inviteUser(db: Db, actorId: number, o: { email: string; name: string; role: Role }) {
  const q = db.$client
  return writeTx(db, () => {
    if (q.prepare('select 1 from users where lower(email) = ?').get(o.email)) {
      throw new Refusal(`${o.email} already has an account.`)
    }
    const { lastInsertRowid } = q.prepare('insert into users (email, name, role, active) values (?, ?, ?, 1)').run(o.email, o.name, o.role)
    writeAudit(db, { actorId, action: 'user.invite', entity: 'user', entityId: Number(lastInsertRowid), after: o })
    return Number(lastInsertRowid)
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
    db.$client.prepare('update users set role = ? where id = ?').run(role, userId)
    writeAudit(db, { actorId, action: 'user.change-role', entity: 'user', entityId: userId, before: { role: before.role }, after: { role } })
    revokeSessionsOf(db, userId)
  })
}

export function setActive(db: Db, actorId: number, userId: number, active: boolean) {
  writeTx(db, () => {
    const before = getUser(db, userId)
    if (!before) throw new Refusal('That user no longer exists.')
    if (Boolean(before.active) === active) return
    if (!active && before.role === 'admin' && activeAdmins(db) <= 1) {
      throw new Refusal('This is the last active administrator and cannot be deactivated.')
    }
    db.$client.prepare('update users set active = ? where id = ?').run(active ? 1 : 0, userId)
    if (!active) {
      revokeSessionsOf(db, userId)
      db.$client.prepare("update api_tokens set revoked_at = strftime('%Y-%m-%dT%H:%M:%fZ','now') where user_id = ? and revoked_at is null").run(userId)
    }
    writeAudit(db, { actorId, action: active ? 'user.reactivate' : 'user.deactivate', entity: 'user', entityId: userId, before: { active: Boolean(before.active) }, after: { active } })
  })
}

export interface AuditRow {
  id: number
  at: string
  actor: string | null
  action: string
  entity: string
  entityId: string | null
  before: string | null
  after: string | null
}

export function listAudit(db: Db, o: { entity?: string; offset: number; limit: number }) {
  const where = o.entity ? 'where a.entity = ?' : ''
  const params = o.entity ? [o.entity] : []
  const rows = db.$client
    .prepare(
      `select a.id, a.created_at as at, u.email as actor, a.action, a.entity, a.entity_id as entityId, a.before, a.after
       from audit_log a left join users u on u.id = a.actor_id ${where}
       order by a.id desc limit ? offset ?`,
    )
    .all(...params, o.limit, o.offset) as AuditRow[]
  const total = o.entity
    ? (db.$client.prepare('select count(*) as n from audit_log a where a.entity = ?').get(o.entity) as { n: number }).n
    : (db.$client.prepare("select rows as n from table_counts where name = 'audit_log'").get() as { n: number }).n
  return { rows, total }
}
