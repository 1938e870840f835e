import { createCookie } from 'react-router'
import { safeReturnTo } from '~/utils/return-to'
import { OAUTH_COOKIE } from './auth'
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
