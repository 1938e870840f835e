import { createCookie } from 'react-router'
import { safeReturnTo } from '~/utils/return-to'
import { writeAudit } from './audit'
import { OAUTH_COOKIE } from './auth'
import type { Db } from './db'
import { secureCookies } from './env'

// Where to go after the provider sends the person back; lives only for the sign-in round trip.
export const returnToCookie = createCookie('dk_return_to', {
  httpOnly: true,
  sameSite: 'lax',
  secure: secureCookies,
  path: '/',
  maxAge: 600,
})

export async function readReturnTo(request: Request): Promise<string> {
  return safeReturnTo(await returnToCookie.parse(request.headers.get('Cookie')))
}

/** Set-Cookie values that expire every state cookie the OAuth strategy left behind. */
export function clearOAuthCookies(request: Request): string[] {
  const names = (request.headers.get('Cookie') ?? '')
    .split(';')
    .map((c) => c.trim().split('=')[0])
    .filter((n) => n.startsWith(OAUTH_COOKIE))
  return names.map((n) => `${n}=; Path=/; Max-Age=0; HttpOnly; SameSite=Lax`)
}

type Refusal = 'unknown' | 'inactive' | 'failed'

// A broken callback (no state, wrong state, spent code) can be sent by anyone without an account, so
// those entries are capped to keep a flood of them from filling the log; refusals of a named account
// come back from the provider and are always kept.
const FAILED_PER_WINDOW = 20
const WINDOW_MS = 10 * 60_000
let failed: number[] = []

/**
 * Records a refused sign-in: the address the provider vouched for (when it got that far) and why,
 * never a code, state or token.
 */
export function auditRefusedSignIn(db: Db, o: { reason: Refusal; email: string | null; userId: number | null }, now = Date.now()) {
  if (o.reason === 'failed') {
    failed = failed.filter((t) => now - t < WINDOW_MS)
    if (failed.length >= FAILED_PER_WINDOW) return false
    failed.push(now)
  }
  writeAudit(db, { actorId: null, action: 'session.refused', entity: 'user', entityId: o.userId, after: { reason: o.reason, email: o.email } })
  return true
}
