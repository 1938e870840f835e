/**
 * A path to come back to after sign-in, kept on this site: only a same-origin path is accepted
 * ("//evil.test", "/\\evil.test", "https://…" and "javascript:" all fall back to "/").
 */
export function safeReturnTo(value: string | null | undefined, fallback = '/'): string {
  if (!value || !value.startsWith('/') || value.startsWith('//') || value.startsWith('/\\')) return fallback
  try {
    const base = 'http://ductkeeper.invalid'
    const url = new URL(value, base)
    if (url.origin !== base) return fallback
    if (url.pathname.startsWith('/auth/') || url.pathname === '/sign-in') return fallback
    // Check what comes out, not what went in: dot segments can collapse "/.//x" into "//x".
    const out = url.pathname + url.search + url.hash
    if (out.startsWith('//') || out.includes('\\')) return fallback
    return out
  } catch {
    return fallback
  }
}
