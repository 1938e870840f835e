import { data, redirect } from 'react-router'
import { Authenticator } from 'remix-auth'
import { OAuth2Strategy } from 'remix-auth-oauth2'
import { allows, isRole, refusal, type Access, type Role } from '~/domain/permissions'
import { safeReturnTo } from '~/utils/return-to'
import { getDb } from './db'
import { env, secureCookies } from './env'
import { perDb } from './repos/statements'
import { userForToken } from './repos/tokens'
import { BACKGROUND_HEADER } from '~/utils/fetch-json'
import { sessionUser } from './sessions'

export interface CurrentUser {
  id: number
  email: string
  name: string
  role: Role
  via: 'session' | 'token'
}

export interface Identity {
  email: string
  name: string | null
  /** The provider's ID token, kept with the session so sign-out can end the provider's session too. */
  idToken: string | null
}

export const OAUTH_COOKIE = 'dk_oauth'

interface Endpoints {
  authorization: string
  token: string
  userinfo: string
  /** RP-initiated logout; a provider without one keeps its own session after sign-out. */
  endSession: string | null
}

async function discover(): Promise<Endpoints> {
  if (env.OIDC_AUTHORIZATION_ENDPOINT && env.OIDC_TOKEN_ENDPOINT && env.OIDC_USERINFO_ENDPOINT) {
    return {
      authorization: env.OIDC_AUTHORIZATION_ENDPOINT,
      token: env.OIDC_TOKEN_ENDPOINT,
      userinfo: env.OIDC_USERINFO_ENDPOINT,
      endSession: env.OIDC_END_SESSION_ENDPOINT ?? null,
    }
  }
  if (!env.OIDC_ISSUER) throw new Error('Set OIDC_ISSUER, or the three OIDC_*_ENDPOINT variables, to sign people in.')
  const res = await fetch(new URL('.well-known/openid-configuration', env.OIDC_ISSUER.replace(/\/?$/, '/')))
  if (!res.ok) throw new Error(`Identity provider discovery failed: HTTP ${res.status}`)
  const doc = (await res.json()) as { authorization_endpoint: string; token_endpoint: string; userinfo_endpoint: string; end_session_endpoint?: string }
  return {
    authorization: doc.authorization_endpoint,
    token: doc.token_endpoint,
    userinfo: doc.userinfo_endpoint,
    endSession: env.OIDC_END_SESSION_ENDPOINT ?? doc.end_session_endpoint ?? null,
  }
}

let discovered: Promise<Endpoints> | null = null

function endpoints(): Promise<Endpoints> {
  discovered ??= discover().catch((error) => {
    discovered = null // retry discovery on the next request
    throw error
  })
  return discovered
}

/**
 * Where to send a person at sign-out so the provider ends its own session too (OpenID Connect
 * RP-initiated logout), coming back to the sign-in page. Without it the provider would sign the next
 * person at this browser straight back in as the last one. Null when the provider has no such
 * endpoint or cannot be reached: the app's session is ended either way.
 */
export async function providerSignOutUrl(request: Request, idToken: string | null): Promise<string | null> {
  let endSession: string | null
  try {
    endSession = (await endpoints()).endSession
  } catch (error) {
    console.warn('sign-out: identity provider not reachable:', error instanceof Error ? error.message : error)
    return null
  }
  if (!endSession) return null
  const url = new URL(endSession)
  // With the ID token the provider knows whose session to end and may skip its question; without one
  // (a refused sign-in keeps no session) the client id lets it accept the way back.
  if (idToken) url.searchParams.set('id_token_hint', idToken)
  else url.searchParams.set('client_id', env.OIDC_CLIENT_ID)
  url.searchParams.set('post_logout_redirect_uri', new URL(SIGNED_OUT_PATH, env.APP_URL ?? request.url).toString())
  return url.toString()
}

export const SIGNED_OUT_PATH = '/sign-in?signed-out'

function idTokenOf(tokens: { idToken(): string }): string | null {
  try {
    return tokens.idToken()
  } catch {
    return null // a plain OAuth 2.0 provider sends none
  }
}

let authenticator: Promise<Authenticator<Identity>> | null = null

/** The OAuth 2.0 authorization-code flow with PKCE (S256) and a checked state, built on first use. */
export function getAuthenticator(request: Request): Promise<Authenticator<Identity>> {
  authenticator ??= (async () => {
    const ep = await endpoints()
    // Outside production (dev server, tests of modules) the request's own origin stands in; production
    // refuses to start without APP_URL or OIDC_REDIRECT_URI, so a Host header can never steer it.
    const redirectURI = env.OIDC_REDIRECT_URI ?? new URL('/auth/callback', env.APP_URL ?? request.url).toString()
    const auth = new Authenticator<Identity>()
    auth.use(
      new OAuth2Strategy<Identity>(
        {
          // The strategy's `secure` option only accepts `true`: leave it out on plain http.
          cookie: { name: OAUTH_COOKIE, path: '/', sameSite: 'Lax', httpOnly: true, ...(secureCookies ? { secure: true } : {}) },
          clientId: env.OIDC_CLIENT_ID,
          clientSecret: env.OIDC_CLIENT_SECRET,
          authorizationEndpoint: ep.authorization,
          tokenEndpoint: ep.token,
          redirectURI,
          scopes: ['openid', 'email', 'profile'],
        },
        async ({ tokens }) => {
          const res = await fetch(ep.userinfo, { headers: { Authorization: `Bearer ${tokens.accessToken()}` } })
          if (!res.ok) throw new Error(`The identity provider did not return the account: HTTP ${res.status}`)
          const info = (await res.json()) as { email?: string; name?: string; email_verified?: boolean }
          if (!info.email) throw new Error('The identity provider did not share an e-mail address.')
          // Accounts are matched on e-mail, so an address the provider has not verified proves nothing.
          if (info.email_verified === false) throw new Error('The identity provider has not verified this e-mail address.')
          return { email: info.email.toLowerCase(), name: info.name ?? null, idToken: idTokenOf(tokens) }
        },
      ),
      'oidc',
    )
    return auth
  })().catch((error) => {
    authenticator = null // retry discovery on the next request
    throw error
  })
  return authenticator
}

// Read on every request: prepared once per database.
const activeUser = perDb((db) =>
  db.$client.prepare<[number], { id: number; email: string; name: string; role: string }>('select id, email, name, role from users where id = ? and active = 1'),
)

function loadUser(id: number, via: CurrentUser['via']): CurrentUser | null {
  const row = activeUser(getDb()).get(id)
  if (!row || !isRole(row.role)) return null
  return { ...row, role: row.role, via }
}

export async function userFromRequest(request: Request): Promise<CurrentUser | null> {
  const header = request.headers.get('Authorization')
  if (header?.startsWith('Bearer ')) {
    const userId = userForToken(getDb(), header.slice(7).trim())
    return userId === null ? null : loadUser(userId, 'token')
  }
  // A page's own timed refresh says so: it is not the person at work, so the idle timer keeps running.
  const touch = request.headers.get(BACKGROUND_HEADER) !== '1'
  const userId = await sessionUser(request.headers.get('Cookie'), touch)
  return userId === null ? null : loadUser(userId, 'session')
}

const isApi = (request: Request) => new URL(request.url).pathname.startsWith('/api/')
const isWrite = (request: Request) => !['GET', 'HEAD', 'OPTIONS'].includes(request.method)

function refuse(request: Request, status: 401 | 403, message: string): never {
  // A 401 names the scheme that would be accepted (HTTP requires the header on every 401).
  const headers = status === 401 ? { 'WWW-Authenticate': 'Bearer realm="Ductkeeper"' } : undefined
  if (isApi(request)) throw Response.json({ error: message }, { status, headers })
  throw data(message, { status, headers })
}

/**
 * A state-changing request carried by a browser cookie must come from this app's own pages.
 * Bearer calls are exempt: a browser never attaches the token by itself.
 */
export function sameOrigin(request: Request): boolean {
  const site = request.headers.get('Sec-Fetch-Site')
  if (site) return site === 'same-origin' || site === 'none'
  const origin = request.headers.get('Origin')
  const expected = new URL(env.APP_URL ?? request.url).origin
  return origin === expected
}

/**
 * The first step of every loader and action: who is asking, and may they? Throws the refusal
 * (redirect to sign-in for pages, 401/403 JSON for the API) so the route never runs for them.
 */
export async function authorize(request: Request, access: Access): Promise<CurrentUser | null> {
  const bearer = request.headers.get('Authorization')?.startsWith('Bearer ') ?? false
  const foreignWrite = () => isWrite(request) && !bearer && !sameOrigin(request)
  if (access === 'public') {
    if (foreignWrite()) refuse(request, 403, 'Refused: this change did not come from a Ductkeeper page.')
    return null
  }
  // Who is asking comes first: a call with no credentials at all is told to sign in (401), not that
  // it is forbidden, whatever its origin headers say.
  const user = await userFromRequest(request)
  if (!user) {
    if (isApi(request) || bearer) refuse(request, 401, 'Sign in or send a valid API token.')
    const url = new URL(request.url)
    throw redirect(`/sign-in?returnTo=${encodeURIComponent(safeReturnTo(url.pathname + url.search))}`)
  }
  if (foreignWrite()) refuse(request, 403, 'Refused: this change did not come from a Ductkeeper page.')
  if (!allows(user.role, access)) refuse(request, 403, access === 'signed-in' ? 'Your role does not allow this.' : refusal(user.role, access))
  return user
}

/** As `authorize`, for routes that are never public. */
export async function requireUser(request: Request, access: Exclude<Access, 'public'>): Promise<CurrentUser> {
  return (await authorize(request, access)) as CurrentUser
}
