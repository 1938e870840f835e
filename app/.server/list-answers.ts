import { listQuery, windowUrl, type Refusal, type SentWindow } from '~/utils/list-window'
import type { Db } from './db'
import { getDb } from './db'
import { parseQuery, runList } from './list-query'
import { customerList, customerQuery } from './lists/customers'
import { deviceList, deviceQuery } from './lists/devices'
import { eventList, eventQuery, searchIsBroad, type EventQuery } from './lists/events'
import { siteList, siteQuery, type SiteQuery } from './lists/sites'
import { reasonCounts, triageList, triageQuery } from './lists/triage'
import { visitList, visitQuery } from './lists/visits'
import { officeToday } from './today'

/**
 * What each JSON list route answers for a request: the query parsed from its address (a thrown 400
 * with the issues on anything it does not accept), then one window of rows. The routes answer
 * through here, and so do the list pages' loaders for their first window: the two cannot differ.
 */
export const listAnswers = {
  '/api/devices': (db: Db, request: Request) => runList(db, deviceList, parseQuery(deviceQuery, request)),
  '/api/events': (db: Db, request: Request) => {
    const parsed = parseQuery(eventQuery, request)
    // `broad` is the server's own finding about the words, never taken from the client.
    const query: EventQuery = { ...parsed, broad: parsed.q ? searchIsBroad(db, parsed.q) : false }
    return runList(db, eventList, query)
  },
  '/api/sites': (db: Db, request: Request) => {
    const query: SiteQuery = { ...parseQuery(siteQuery, request), today: officeToday() }
    return runList(db, siteList, query)
  },
  '/api/customers': (db: Db, request: Request) => runList(db, customerList, parseQuery(customerQuery, request)),
  '/api/visits': (db: Db, request: Request) => runList(db, visitList, parseQuery(visitQuery, request)),
  // The reasons' counts ride along with any window of the queue.
  '/api/triage': (db: Db, request: Request) => ({ ...triageList(db, parseQuery(triageQuery, request), officeToday()), counts: reasonCounts(db) }),
}
type Endpoint = keyof typeof listAnswers

/**
 * A list page's first window of rows, read on the server exactly as the JSON route answers the
 * table's first request for the page's address, and keyed by that request's URL. The table shows
 * these rows in the server's HTML and keeps them as the client cache's answer for that URL, so it
 * does not ask again. An address the route refuses comes back as the refusal (the table says what
 * was wrong, with a way back), never as an error page. Call only after the route's own access check,
 * which must be the JSON route's.
 */
export async function firstWindow<E extends Endpoint>(request: Request, endpoint: E): Promise<SentWindow> {
  const url = new URL(request.url)
  const key = windowUrl(endpoint, listQuery(url.searchParams), 0)
  try {
    const page = listAnswers[endpoint](getDb(), new Request(new URL(key, url)))
    // Sent as the JSON route's own text, which the page's data carries as one string: encoded value
    // by value, a window of 100 rows cost about 4 ms of every page's answer, and JSON is what the
    // route itself answers (dates as ISO text), so the cache holds the same either way.
    return { key, json: JSON.stringify(page) }
  } catch (e) {
    if (e instanceof Response && e.status === 400) return { key, refused: (await e.json()) as Refusal }
    throw e
  }
}
