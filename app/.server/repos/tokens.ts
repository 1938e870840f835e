import { createHash, randomBytes } from 'node:crypto'
import { and, desc, eq, gt, isNotNull, isNull, sql } from 'drizzle-orm'
import { writeIfFree, writeTx, type Db } from '../db'
import { writeAudit } from '../audit'
import { apiTokens, users } from '../schema'
import { perDb } from './statements'

const hash = (token: string) => createHash('sha256').update(token).digest('hex')

/** Creates a token and returns its text once; only its SHA-256 is stored. */
export function createToken(db: Db, o: { userId: number; name: string; expiresAt: Date; actorId: number | null }) {
  const prefix = randomBytes(4).toString('hex')
  const token = `dk_${prefix}_${randomBytes(24).toString('base64url')}`
  return writeTx(db, () => {
    const { id } = db
      .insert(apiTokens)
      .values({ userId: o.userId, name: o.name, tokenHash: hash(token), prefix, expiresAt: o.expiresAt.toISOString() })
      .returning({ id: apiTokens.id })
      .get()
    writeAudit(db, { actorId: o.actorId, action: 'token.create', entity: 'api_token', entityId: id, after: { userId: o.userId, name: o.name, prefix, expiresAt: o.expiresAt.toISOString() } })
    return { id, token, prefix }
  })
}

export function listTokens(db: Db) {
  return db
    .select({
      id: apiTokens.id,
      userId: apiTokens.userId,
      userEmail: users.email,
      name: apiTokens.name,
      prefix: apiTokens.prefix,
      createdAt: apiTokens.createdAt,
      expiresAt: apiTokens.expiresAt,
      lastUsedAt: apiTokens.lastUsedAt,
      revokedAt: apiTokens.revokedAt,
    })
    .from(apiTokens)
    .innerJoin(users, eq(users.id, apiTokens.userId))
    .orderBy(isNotNull(apiTokens.revokedAt), desc(apiTokens.createdAt))
    .all()
}

export function revokeToken(db: Db, id: number, actorId: number | null): boolean {
  return writeTx(db, () => {
    const before = db
      .select({ name: apiTokens.name, prefix: apiTokens.prefix, revokedAt: apiTokens.revokedAt })
      .from(apiTokens)
      .where(eq(apiTokens.id, id))
      .get()
    if (!before || before.revokedAt) return false
    db.update(apiTokens).set({ revokedAt: new Date().toISOString() }).where(eq(apiTokens.id, id)).run()
    writeAudit(db, { actorId, action: 'token.revoke', entity: 'api_token', entityId: id, before, after: { revoked: true } })
    return true
  })
}

// Every Bearer request looks its token up: prepared once per database.
const bearer = perDb((db: Db) => ({
  find: db
    .select({ id: apiTokens.id, userId: apiTokens.userId, lastUsedAt: apiTokens.lastUsedAt })
    .from(apiTokens)
    .innerJoin(users, eq(users.id, apiTokens.userId))
    .where(
      and(
        eq(apiTokens.tokenHash, sql.placeholder('hash')),
        isNull(apiTokens.revokedAt),
        gt(apiTokens.expiresAt, sql.placeholder('now')),
        eq(users.active, true),
      ),
    )
    .prepare(),
  touch: db
    .update(apiTokens)
    // A set value takes a placeholder only inside sql``.
    .set({ lastUsedAt: sql`${sql.placeholder('now')}` })
    .where(eq(apiTokens.id, sql.placeholder('id')))
    .prepare(),
}))

/** The active user a bearer token belongs to, or null if unknown, expired, revoked or the user is inactive. */
export function userForToken(db: Db, token: string): number | null {
  const s = bearer(db)
  const now = new Date().toISOString()
  const row = s.find.get({ hash: hash(token), now })
  if (!row) return null
  // Record use at most once a minute: a busy integration would otherwise write on every call.
  if (!row.lastUsedAt || Date.now() - Date.parse(row.lastUsedAt) > 60_000) writeIfFree(db.$client, () => s.touch.run({ now, id: row.id }))
  return row.userId
}
