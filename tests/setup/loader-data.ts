import { UNSAFE_decodeViaTurboStream as decodeTurboStream } from 'react-router'

/**
 * What a page's loader returned, fetched from the built server the way the client fetches it on
 * navigation (`<path>.data`, React Router's single fetch) and decoded, then passed through JSON so it
 * compares with an `/api/…` answer field by field.
 */
export async function pageLoaderData<T>(baseUrl: string, path: string, routeId: string, headers: Record<string, string>): Promise<T> {
  const res = await fetch(`${baseUrl}${path}.data?_routes=${encodeURIComponent(routeId)}`, { headers })
  if (res.status !== 200 || !res.body) throw new Error(`${path}.data answered ${res.status}`)
  const decoded = await decodeTurboStream(res.body, globalThis)
  const route = (decoded.value as Record<string, { data?: unknown; error?: unknown }>)[routeId]
  if (!route || !('data' in route)) throw new Error(`${path}.data carried no data for ${routeId}: ${JSON.stringify(route)}`)
  return JSON.parse(JSON.stringify(route.data)) as T
}
