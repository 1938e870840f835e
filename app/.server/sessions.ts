import { randomBytes } from 'node:crypto'
import { createCookie, createSessionStorage } from 'react-router'
import { getDb, writeIfFree, type Db } from './db'
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
    // Skipped while another connection writes; the next request marks it.
    writeIfFree(q, () => q.prepare('update sessions set last_seen_at = ? where id = ?').run(new Date(now).toISOString(), id))
  }
  return { userId: row.userId }
}

// Checking a cookie's signature costs an HMAC key import and verification (about half a
// millisecond) on every request, and the outcome depends on the cookie's text alone: the session
// ids of recently checked cookies are kept. The session's row is still read on every request, so a
// revoked, expired or idle session is refused at once.
const verified = new Map<string, string>()
const MAX_VERIFIED = 1000
const MAX_KEPT_HEADER = 2048

/** The session id a Cookie header carries once its signature is checked; null without a valid one. */
async function sessionIdOf(cookieHeader: string | null): Promise<string | null> {
  if (!cookieHeader) return null
  const kept = verified.get(cookieHeader)
  if (kept !== undefined) return kept
  const id: unknown = await sessionCookie.parse(cookieHeader)
  if (typeof id !== 'string' || !id) return null
  if (cookieHeader.length <= MAX_KEPT_HEADER) {
    if (verified.size >= MAX_VERIFIED) verified.delete(verified.keys().next().value as string)
    verified.set(cookieHeader, id)
  }
  return id
}

/**
 * The user of the live session a request's cookie names, or null. `touch` counts the request as
 * activity; a page's timed refresh passes false, so the idle timer keeps running.
 */
export async function sessionUser(cookieHeader: string | null, touch: boolean): Promise<number | null> {
  const id = await sessionIdOf(cookieHeader)
  return id === null ? null : (readSession(id, touch)?.userId ?? null)
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
