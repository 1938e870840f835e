import { generateKeyPairSync, randomBytes } from 'node:crypto'
import { createServer, type IncomingMessage, type ServerResponse } from 'node:http'
import type { AddressInfo } from 'node:net'
import { pathToFileURL } from 'node:url'
import type { Configuration, OidcContext, Provider } from 'oidc-provider'

export interface IdpAccount { email: string; name: string }
export interface IdpOptions {
  port?: number
  host?: string
  clientId: string
  clientSecret: string
  redirectUris: string[]
  /** Where the app may send people back after sign-out; by default its `/sign-in?signed-out` beside each redirect. */
  postLogoutRedirectUris?: string[]
  accounts: IdpAccount[]
}
export interface RunningIdp { issuer: string; close(): Promise<void> }

/** The company directory as the demo sees it; the last person has no Ductkeeper account on purpose. */
export const DEMO_DIRECTORY: IdpAccount[] = [
  { email: 'admin@ductkeeper.test', name: 'Ada Whitlock' },
  { email: 'lead@ductkeeper.test', name: 'Priya Castellano' },
  { email: 'office@ductkeeper.test', name: 'Marcus Oyelaran' },
  { email: 'tech@ductkeeper.test', name: 'Tomas Reyna' },
  { email: 'manager@ductkeeper.test', name: 'Helen Sato' },
  { email: 'visitor@ductkeeper.test', name: 'Sam Visitor' },
]

let providerClass: Promise<typeof Provider> | undefined

// The library warns about any runtime older than Node 22 while it is first evaluated; that one line
// is noise here (it runs fine on Node 20), so it is dropped and every other warning still shows.
function loadProvider(): Promise<typeof Provider> {
  providerClass ??= (async () => {
    const warn = console.warn
    console.warn = (...args: unknown[]) => {
      if (!String(args[0]).includes('Unsupported runtime')) warn(...args)
    }
    try {
      return (await import('oidc-provider')).default
    } finally {
      console.warn = warn
    }
  })()
  return providerClass
}

const escapeHtml = (s: string) =>
  s.replace(/[&<>"']/g, (c) => ({ '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;', "'": '&#39;' })[c]!)

function page(title: string, body: string): string {
  return `<!doctype html>
<html lang="en"><head><meta charset="utf-8"><meta name="viewport" content="width=device-width, initial-scale=1">
<title>${escapeHtml(title)}</title>
<style>
body{margin:0;background:#f4f5f7;color:#1f2933;font:15px/1.5 system-ui,-apple-system,"Segoe UI",sans-serif}
main{max-width:26rem;margin:3rem auto;padding:1.5rem 1.75rem;background:#fff;border:1px solid #d9dde3;border-radius:8px}
h1{font-size:1.15rem;margin:0 0 .5rem}p{margin:.5rem 0;color:#52606d}
form{margin:0}ul{list-style:none;padding:0;margin:1rem 0}li{margin:.4rem 0}
button{width:100%;text-align:left;padding:.6rem .8rem;border:1px solid #c3c9d1;border-radius:6px;background:#fff;font:inherit;cursor:pointer}
button:hover,button:focus-visible{border-color:#3b6fb6;background:#f0f5fc;outline:none}
button span{display:block;color:#52606d;font-size:.85rem}
.quiet{text-align:center;color:#52606d;background:none;border-color:transparent}
</style></head><body><main>${body}</main></body></html>`
}

function loginPage(uid: string, accounts: IdpAccount[]): string {
  const action = `/interaction/${uid}`
  const buttons = accounts
    .map(
      (a) => `<li><form method="post" action="${action}/login">
<input type="hidden" name="email" value="${escapeHtml(a.email)}">
<button type="submit">${escapeHtml(a.email)}<span>${escapeHtml(a.name)}</span></button></form></li>`,
    )
    .join('\n')
  return page(
    'Sign in (local stand-in)',
    `<h1>Local stand-in identity provider</h1>
<p>This is the local stand-in for the company's identity provider, used only when Ductkeeper runs locally
and in its tests. In production Ductkeeper signs in through the company's real provider.</p>
<p>Choose who to sign in as:</p>
<ul>${buttons}</ul>
<form method="post" action="${action}/cancel"><button class="quiet" type="submit">Cancel</button></form>`,
  )
}

function send(res: ServerResponse, status: number, html: string) {
  res.writeHead(status, { 'content-type': 'text/html; charset=utf-8', 'cache-control': 'no-store' })
  res.end(html)
}

async function readForm(req: IncomingMessage): Promise<URLSearchParams> {
  let body = ''
  for await (const chunk of req) {
    body += chunk
    if (body.length > 10_000) break
  }
  return new URLSearchParams(body)
}

function buildConfiguration(opts: IdpOptions): Configuration {
  const names = new Map(opts.accounts.map((a) => [a.email, a.name]))
  const key = generateKeyPairSync('rsa', { modulusLength: 2048 }).privateKey.export({ format: 'jwk' })
  return {
    clients: [
      {
        client_id: opts.clientId,
        client_secret: opts.clientSecret,
        redirect_uris: opts.redirectUris,
        post_logout_redirect_uris: opts.postLogoutRedirectUris ?? opts.redirectUris.map((u) => new URL('/sign-in?signed-out', u).toString()),
        token_endpoint_auth_method: 'client_secret_basic',
        grant_types: ['authorization_code'],
        response_types: ['code'],
      },
    ],
    jwks: { keys: [{ ...key, kid: randomBytes(8).toString('hex'), alg: 'RS256', use: 'sig' }] },
    cookies: {
      // Cookies ignore ports, so the app and this provider share a jar on loopback; distinct names keep them apart.
      names: { session: 'idp_session', interaction: 'idp_interaction', resume: 'idp_resume' },
      keys: [randomBytes(32).toString('base64url')],
    },
    // By default PKCE is demanded only of public clients; the app is confidential and must still use it.
    pkce: { required: () => true },
    responseTypes: ['code'],
    scopes: ['openid', 'email', 'profile'],
    claims: { openid: ['sub'], email: ['email', 'email_verified'], profile: ['name'] },
    // The app reads the e-mail straight from the id_token, without a userinfo call.
    conformIdTokenClaims: false,
    features: {
      devInteractions: { enabled: false },
      rpInitiatedLogout: {
        enabled: true,
        logoutSource: (ctx: OidcContext, form: string) => {
          ctx.type = 'html'
          // The library has already checked any id_token_hint: with one, the app is ending this person's
          // session, so sign out at once as company providers commonly do. Without one, ask first.
          if (ctx.oidc.params.id_token_hint) {
            ctx.body = page(
              'Signing out (local stand-in)',
              `<h1>Signing out…</h1>${form.replace('</form>', '<input type="hidden" name="logout" value="yes"><noscript><button type="submit">Continue</button></noscript></form>')}
<script>document.getElementById('op.logoutForm').submit()</script>`,
            )
            return
          }
          ctx.body = page(
            'Sign out (local stand-in)',
            `<h1>Sign out of the local stand-in?</h1><p>Then you can sign in as someone else.</p>${form}
<ul><li><button type="submit" form="op.logoutForm" name="logout" value="yes" autofocus>Yes, sign out</button></li>
<li><button class="quiet" type="submit" form="op.logoutForm">Stay signed in</button></li></ul>`,
          )
        },
        postLogoutSuccessSource: (ctx: OidcContext) => {
          ctx.type = 'html'
          ctx.body = page('Signed out', '<h1>Signed out</h1><p>You are signed out of the local stand-in.</p>')
        },
      },
    },
    interactions: { url: (_ctx, interaction) => `/interaction/${interaction.uid}` },
    // Every directory member may use Ductkeeper's scopes, so no consent screen is shown.
    async loadExistingGrant(ctx) {
      const { client, session, result, provider } = ctx.oidc
      const grantId = result?.consent?.grantId || session.grantIdFor(client.clientId)
      if (grantId) return provider.Grant.find(grantId)
      const grant = new provider.Grant({ clientId: client.clientId, accountId: session.accountId })
      grant.addOIDCScope('openid email profile')
      await grant.save()
      return grant
    },
    findAccount(_ctx, id) {
      const name = names.get(id)
      if (name === undefined) return undefined
      // accountId must be the id asked for, or the library refuses the account.
      return { accountId: id, claims: () => ({ sub: id, email: id, email_verified: true, name }) }
    },
    clientBasedCORS: () => false,
    renderError(ctx, out) {
      const lines = Object.entries(out).map(([k, v]) => `<p><strong>${escapeHtml(k)}</strong>: ${escapeHtml(String(v))}</p>`)
      ctx.type = 'html'
      ctx.body = page('Sign-in problem', `<h1>Something went wrong</h1>${lines.join('')}`)
    },
    ttl: {
      AuthorizationCode: 60,
      AccessToken: 10 * 60,
      IdToken: 10 * 60,
      Interaction: 10 * 60,
      Grant: 8 * 60 * 60,
      Session: 8 * 60 * 60,
    },
  }
}

export async function startIdentityProvider(opts: IdpOptions): Promise<RunningIdp> {
  const Provider = await loadProvider()
  const host = opts.host ?? '127.0.0.1'
  const accounts = new Set(opts.accounts.map((a) => a.email))
  // Set once listening (the issuer needs the port); the request handler reads them before that.
  // eslint-disable-next-line prefer-const
  let provider: Provider | undefined
  // eslint-disable-next-line prefer-const
  let delegate: ((req: IncomingMessage, res: ServerResponse) => void) | undefined

  async function interaction(provider: Provider, req: IncomingMessage, res: ServerResponse, uid: string, action?: string) {
    try {
      const details = await provider.interactionDetails(req, res)
      if (details.uid !== uid) return send(res, 400, page('Sign-in problem', '<h1>This sign-in has moved on</h1><p>Start again from Ductkeeper.</p>'))
      if (req.method === 'GET' && !action) return send(res, 200, loginPage(uid, opts.accounts))
      if (req.method === 'POST' && action === 'login') {
        const email = (await readForm(req)).get('email') ?? ''
        if (!accounts.has(email)) return send(res, 400, page('Unknown person', '<h1>Not in the directory</h1><p>That person cannot sign in here.</p>'))
        return await provider.interactionFinished(req, res, { login: { accountId: email } }, { mergeWithLastSubmission: false })
      }
      if (req.method === 'POST' && action === 'cancel') {
        return await provider.interactionFinished(
          req,
          res,
          { error: 'access_denied', error_description: 'The person cancelled the sign-in.' },
          { mergeWithLastSubmission: false },
        )
      }
      send(res, 404, page('Not found', '<h1>Not found</h1>'))
    } catch {
      // Usually an expired or missing interaction cookie: the flow has to start over from the app.
      send(res, 400, page('Sign-in expired', '<h1>This sign-in has expired</h1><p>Start again from Ductkeeper.</p>'))
    }
  }

  const server = createServer((req, res) => {
    const path = new URL(req.url ?? '/', 'http://x').pathname
    const match = /^\/interaction\/([\w-]+)(?:\/(login|cancel))?$/.exec(path)
    if (!provider || !delegate) return send(res, 503, page('Starting', '<h1>Starting up</h1>'))
    if (match) void interaction(provider, req, res, match[1], match[2])
    else delegate(req, res)
  })
  await new Promise<void>((resolve, reject) => {
    server.once('error', reject)
    server.listen(opts.port ?? 0, host, () => resolve())
  })
  const { port } = server.address() as AddressInfo
  // The issuer carries the real port, known only once listening, so the provider is built after listen.
  const issuer = `http://${host.includes(':') ? `[${host}]` : host}:${port}`
  provider = new Provider(issuer, buildConfiguration(opts))
  delegate = provider.callback()

  return {
    issuer,
    close: () =>
      new Promise<void>((resolve, reject) => {
        server.close((err) => (err ? reject(err) : resolve()))
        server.closeAllConnections()
      }),
  }
}

if (process.argv[1] && import.meta.url === pathToFileURL(process.argv[1]).href) {
  const env = process.env
  const idp = await startIdentityProvider({
    port: Number(env.IDP_PORT ?? 4010),
    clientId: env.IDP_CLIENT_ID ?? 'ductkeeper-local',
    clientSecret: env.IDP_CLIENT_SECRET ?? 'local-secret-not-for-production',
    redirectUris: [env.IDP_REDIRECT_URI ?? 'http://localhost:3000/auth/callback'],
    accounts: DEMO_DIRECTORY,
  })
  console.log(`Local stand-in identity provider: ${idp.issuer}`)
  const stop = () => void idp.close().then(() => process.exit(0))
  process.once('SIGINT', stop)
  process.once('SIGTERM', stop)
}
