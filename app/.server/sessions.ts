import { randomBytes } from 'node:crypto'
import { createCookie, createSessionStorage } from 'react-router'
import { getDb, type Db } from './db'
import { env, secureCookies, sessionSecret } from './env'

interface SessionData {
  userId: number
  /** Written once at sign-in to the session's row, never read back into the session's data. */
  idToken?: string
}

const HOUR = 3_600_000

const sessionCookie = createCookie('__dk_session', {
  httpOnly: true,
  sameSite: 'lax',
  secure: secureCookies,
  path: '/',
  secrets: [sessionSecret],
  maxAge: env.SESSION_MAX_AGE_HOURS * 3600,
})

/**
 * The live session's data, or null once it is revoked, past its lifetime or idle too long. `touch`
 * counts the request as activity (moving last_seen_at on); a timed refresh passes false.
 */
function readSession(id: string, touch: boolean): SessionData | null {
  const q = getDb().$client
  const row = q
    .prepare('select user_id as userId, expires_at as expiresAt, last_seen_at as lastSeenAt, revoked_at as revokedAt from sessions where id = ?')
    .get(id) as { userId: number; expiresAt: string; lastSeenAt: string; revokedAt: string | null } | undefined
  if (!row || row.revokedAt) return null
  const now = Date.now()
  if (Date.parse(row.expiresAt) <= now) return null
  if (now - Date.parse(row.lastSeenAt) > env.SESSION_IDLE_MINUTES * 60_000) return null
  // Touch at most once a minute: every request would otherwise write.
  if (touch && now - Date.parse(row.lastSeenAt) > 60_000) {
    q.prepare('update sessions set last_seen_at = ? where id = ?').run(new Date(now).toISOString(), id)
  }
  return { userId: row.userId }
}

/** The session's user id for a request that must not count as activity (a page's timed refresh). */
export async function sessionUserWithoutTouch(cookieHeader: string | null): Promise<number | null> {
  const id = await sessionCookie.parse(cookieHeader)
  return typeof id === 'string' && id ? (readSession(id, false)?.userId ?? null) : null
}

/**
 * Sessions live in the database; the cookie carries only a signed random id. Sign-out and an
 * administrator's deactivation revoke the record, so a copied cookie stops working at once.
 */
export const sessionStorage = createSessionStorage<SessionData>({
  cookie: sessionCookie,
  async createData(data, expires) {
    const id = randomBytes(24).toString('base64url')
    const now = new Date()
    getDb()
      .$client.prepare(
        'insert into sessions (id, user_id, created_at, expires_at, last_seen_at, id_token) values (?, ?, ?, ?, ?, ?)',
      )
      .run(
        id,
        data.userId,
        now.toISOString(),
        (expires ?? new Date(now.getTime() + env.SESSION_MAX_AGE_HOURS * HOUR)).toISOString(),
        now.toISOString(),
        data.idToken ?? null,
      )
    return id
  },
  async readData(id) {
    return readSession(id, true)
  },
  async updateData(id, data) {
    getDb().$client.prepare('update sessions set user_id = ? where id = ?').run(data.userId, id)
  },
  async deleteData(id) {
    getDb().$client.prepare("update sessions set revoked_at = strftime('%Y-%m-%dT%H:%M:%fZ','now') where id = ? and revoked_at is null").run(id)
  },
})

/** The provider's ID token kept for a session at sign-in (null for one made without the provider). */
export function sessionIdToken(id: string): string | null {
  if (!id) return null
  const row = getDb().$client.prepare('select id_token as idToken from sessions where id = ?').get(id) as { idToken: string | null } | undefined
  return row?.idToken ?? null
}

/** Revokes every live session of a user (deactivation, role change), inside the caller's transaction. */
export function revokeSessionsOf(db: Db, userId: number) {
  db.$client
    .prepare("update sessions set revoked_at = strftime('%Y-%m-%dT%H:%M:%fZ','now') where user_id = ? and revoked_at is null")
    .run(userId)
}
