// The one way the browser asks the JSON API: a non-OK answer becomes a FetchError carrying the
// server's own message, and a 401 (the session ended) sends the page to sign-in and back.

/** Marks a request made by a timer rather than a person: the server does not count it as activity. */
export const BACKGROUND_HEADER = 'X-Background-Refresh'

export class FetchError extends Error {
  readonly status: number
  /** The parsed answer, when there was one (e.g. a 409's details). */
  readonly body: unknown
  constructor(status: number, message: string, body: unknown = null) {
    super(message)
    this.name = 'FetchError'
    this.status = status
    this.body = body
  }
}

export interface FetchJsonOptions extends Omit<RequestInit, 'body'> {
  /** Sent as a JSON body. */
  json?: unknown
  /** A timed refresh: it must not keep an idle session alive. */
  background?: boolean
}

/** Where to sign in so that the person comes back to `path` afterwards. */
export function signInHref(path: string): string {
  return `/sign-in?returnTo=${encodeURIComponent(path)}`
}

/** The message to show for an error answer: the first validation issue, else the server's `error`. */
export function messageOf(status: number, body: unknown): string {
  const b = (body ?? {}) as { error?: unknown; issues?: Array<{ message?: unknown }> }
  const issue = Array.isArray(b.issues) ? b.issues[0]?.message : undefined
  if (typeof issue === 'string' && issue) return issue
  if (typeof b.error === 'string' && b.error) return b.error
  if (status >= 500) return 'The server could not answer. Try again in a moment.'
  return `The server refused the request (${status}).`
}

// Several windows can answer 401 at once: leave for sign-in only once.
let leaving = false

function goToSignIn() {
  if (leaving || typeof window === 'undefined') return
  leaving = true
  const { pathname, search, hash } = window.location
  window.location.assign(signInHref(pathname + search + hash))
}

export async function fetchJson<T>(url: string, o: FetchJsonOptions = {}): Promise<T> {
  const { json, background, headers: given, ...init } = o
  const headers = new Headers(given)
  headers.set('Accept', 'application/json')
  if (background) headers.set(BACKGROUND_HEADER, '1')
  if (json !== undefined) headers.set('Content-Type', 'application/json')
  let res: Response
  try {
    res = await fetch(url, { ...init, headers, body: json === undefined ? undefined : JSON.stringify(json) })
  } catch {
    throw new FetchError(0, 'Ductkeeper could not be reached. Check the connection and try again.')
  }
  const body: unknown = await res.json().catch(() => null)
  if (res.status === 401) {
    goToSignIn()
    throw new FetchError(401, 'Your session has ended. Taking you to sign in…', body)
  }
  if (!res.ok) throw new FetchError(res.status, messageOf(res.status, body), body)
  return body as T
}
