import { createHash, randomBytes } from 'node:crypto'
import { writeTx, type Db } from '../db'
import { writeAudit } from '../audit'

const hash = (token: string) => createHash('sha256').update(token).digest('hex')

export interface TokenRow {
  id: number
  userId: number
  userEmail: string
  name: string
  prefix: string
  createdAt: string
  expiresAt: string
  lastUsedAt: string | null
  revokedAt: string | null
}

/** Creates a token and returns its text once; only its SHA-256 is stored. */
export function createToken(db: Db, o: { userId: number; name: string; expiresAt: Date; actorId: number | null }) {
  const prefix = randomBytes(4).toString('hex')
  const token = `dk_${prefix}_${randomBytes(24).toString('base64url')}`
  const q = db.$client
  return writeTx(db, () => {
    const { lastInsertRowid } = q
      .prepare('insert into api_tokens (user_id, name, token_hash, prefix, expires_at) values (?, ?, ?, ?, ?)')
      .run(o.userId, o.name, hash(token), prefix, o.expiresAt.toISOString())
    const id = Number(lastInsertRowid)
    writeAudit(db, { actorId: o.actorId, action: 'token.create', entity: 'api_token', entityId: id, after: { userId: o.userId, name: o.name, prefix, expiresAt: o.expiresAt.toISOString() } })
    return { id, token, prefix }
  })
}

export function listTokens(db: Db): TokenRow[] {
  return db.$client
    .prepare(
      `select t.id, t.user_id as userId, u.email as userEmail, t.name, t.prefix, t.created_at as createdAt,
              t.expires_at as expiresAt, t.last_used_at as lastUsedAt, t.revoked_at as revokedAt
       from api_tokens t join users u on u.id = t.user_id order by t.revoked_at is not null, t.created_at desc`,
    )
    .all() as TokenRow[]
}

export function revokeToken(db: Db, id: number, actorId: number | null): boolean {
  const q = db.$client
  return writeTx(db, () => {
    const before = q.prepare('select name, prefix, revoked_at as revokedAt from api_tokens where id = ?').get(id) as { name: string; prefix: string; revokedAt: string | null } | undefined
    if (!before || before.revokedAt) return false
    q.prepare("update api_tokens set revoked_at = strftime('%Y-%m-%dT%H:%M:%fZ','now') where id = ?").run(id)
    writeAudit(db, { actorId, action: 'token.revoke', entity: 'api_token', entityId: id, before, after: { revoked: true } })
    return true
  })
}

/** The active user a bearer token belongs to, or null if unknown, expired, revoked or the user is inactive. */
export function userForToken(db: Db, token: string): number | null {
  const q = db.$client
  const row = q
    .prepare(
      `select t.id, t.user_id as userId, t.last_used_at as lastUsedAt from api_tokens t join users u on u.id = t.user_id
       where t.token_hash = ? and t.revoked_at is null and t.expires_at > ? and u.active = 1`,
    )
    .get(hash(token), new Date().toISOString()) as { id: number; userId: number; lastUsedAt: string | null } | undefined
  if (!row) return null
  // Record use at most once a minute: a busy integration would otherwise write on every call.
  if (!row.lastUsedAt || Date.now() - Date.parse(row.lastUsedAt) > 60_000) {
    q.prepare('update api_tokens set last_used_at = ? where id = ?').run(new Date().toISOString(), row.id)
  }
  return row.userId
}
