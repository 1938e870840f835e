/** A tiny cookie jar: cookies ignore ports, so one jar serves the app and the provider on loopback. */
export class Jar {
  cookies = new Map<string, string>()
  take(res: Response) {
    for (const line of res.headers.getSetCookie()) {
      const [pair, ...attrs] = line.split(';')
      const eq = pair.indexOf('=')
      const name = pair.slice(0, eq).trim()
      const value = pair.slice(eq + 1).trim()
      const dead = attrs.some((a) => /^\s*max-age=0\s*$/i.test(a)) || attrs.some((a) => /^\s*expires=/i.test(a) && Date.parse(a.split('=')[1]) < Date.now())
      if (dead || value === '') this.cookies.delete(name)
      else this.cookies.set(name, value)
    }
  }
  header() {
    return [...this.cookies].map(([k, v]) => `${k}=${v}`).join('; ')
  }
}

export async function go(jar: Jar, url: string, init: RequestInit = {}) {
  const res = await fetch(url, { ...init, redirect: 'manual', headers: { ...(init.headers as Record<string, string>), Cookie: jar.header() } })
  jar.take(res)
  return res
}

/** Follows redirects by hand, keeping cookies, until a non-redirect or a URL matching `stop`. */
export async function follow(jar: Jar, url: string, stop?: (url: string) => boolean, init: RequestInit = {}) {
  let current = url
  let res = await go(jar, current, init)
  for (let i = 0; i < 15 && res.status >= 300 && res.status < 400; i++) {
    current = new URL(res.headers.get('location')!, current).toString()
    if (stop?.(current)) return { res, url: current }
    res = await go(jar, current)
  }
  return { res, url: current }
}

/**
 * Signs in through the app's real flow: POST /sign-in → provider → pick the account → callback.
 * Returns the jar (with the session cookie), the callback URL used and the final response.
 */
export async function signInViaProvider(appUrl: string, email: string, returnTo = '/') {
  const jar = new Jar()
  const origin = new URL(appUrl).origin
  const start = await go(jar, `${appUrl}/sign-in`, {
    method: 'POST',
    headers: { Origin: origin, 'Content-Type': 'application/x-www-form-urlencoded' },
    body: new URLSearchParams({ returnTo }),
  })
  if (start.status !== 302) throw new Error(`sign-in did not redirect: ${start.status}`)
  const toProvider = await follow(jar, start.headers.get('location')!)
  const interaction = toProvider.url
  const login = await go(jar, `${interaction.replace(/\/$/, '')}/login`, {
    method: 'POST',
    headers: { 'Content-Type': 'application/x-www-form-urlencoded' },
    body: new URLSearchParams({ email }),
  })
  let callbackUrl = ''
  const back = await follow(jar, new URL(login.headers.get('location')!, interaction).toString(), (u) => {
    if (u.startsWith(`${appUrl}/auth/callback`)) callbackUrl = u
    return u.startsWith(`${appUrl}/auth/callback`)
  })
  if (!callbackUrl) throw new Error(`never reached the callback: ${back.url} ${back.res.status}`)
  const oauthCookies = new Map(jar.cookies)
  const callback = await go(jar, callbackUrl)
  return { jar, callbackUrl, callback, oauthCookies }
}
