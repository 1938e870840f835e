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
