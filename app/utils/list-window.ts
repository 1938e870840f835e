// How a list's rows are asked for a window at a time: shared by the table in the browser and by the
// list pages' loaders, which read the first window on the server under the very same request URL.

/** Rows in one window: what the table asks the JSON route for at a time. */
export const WINDOW_ROWS = 100

/** The list query string: every filter and the sort, never paging (the table pages itself), in a stable order. */
export function listQuery(params: URLSearchParams): string {
  const next = new URLSearchParams(params)
  next.delete('offset')
  next.delete('limit')
  next.delete('view')
  next.sort()
  return next.toString()
}

/** The JSON route's URL for window `w` of a list: also the client cache's key for those rows. */
export function windowUrl(endpoint: string, query: string, w: number): string {
  return `${endpoint}?${query ? `${query}&` : ''}offset=${w * WINDOW_ROWS}&limit=${WINDOW_ROWS}`
}

/** A list route's refusal of an address, as it answers it (status 400). */
export interface Refusal {
  error: string
  issues: Array<{ path: string; message: string }>
}

/**
 * A list page's first window as its loader sends it, under the URL the table would ask for it: the
 * JSON route's answer as its own text, or the route's refusal of the address.
 */
export type SentWindow = { key: string; json: string } | { key: string; refused: Refusal }

/** A window as the table keeps it: the route's answer read, or its refusal. */
export type ReadWindow<P> = { key: string; page: P } | { key: string; refused: Refusal }

const read = new WeakMap<SentWindow, ReadWindow<unknown>>()

/**
 * The sent window read, once per window sent: the same object for every caller, so the table can
 * tell a new first window from the one it already took by identity.
 */
export function readWindow<P>(sent: SentWindow): ReadWindow<P> {
  let out = read.get(sent)
  if (!out) read.set(sent, (out = 'json' in sent ? { key: sent.key, page: JSON.parse(sent.json) as unknown } : sent))
  return out as ReadWindow<P>
}
