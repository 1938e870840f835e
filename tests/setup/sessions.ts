import { randomBytes } from 'node:crypto'
import { createCookie } from 'react-router'
import type { Db } from '~/.server/db'
import { TEST_SESSION_SECRET } from './server'

const cookie = createCookie('__dk_session', { secrets: [TEST_SESSION_SECRET], path: '/', httpOnly: true, sameSite: 'lax' })

/** Writes a live session for a user straight into the database and returns its Cookie header. */
export async function sessionCookieFor(db: Db, userId: number, o: { expiresAt?: Date; lastSeenAt?: Date } = {}) {
  const id = randomBytes(24).toString('base64url')
  const now = new Date()
  db.$client
    .prepare('insert into sessions (id, user_id, created_at, expires_at, last_seen_at) values (?, ?, ?, ?, ?)')
    .run(id, userId, now.toISOString(), (o.expiresAt ?? new Date(now.getTime() + 3_600_000)).toISOString(), (o.lastSeenAt ?? now).toISOString())
  const header = await cookie.serialize(id)
  return { id, cookie: header.split(';')[0] }
}

export function userIdByEmail(db: Db, email: string): number {
  return (db.$client.prepare('select id from users where email = ?').get(email) as { id: number }).id
}
