import type { RouteAccess } from '~/domain/permissions'
import { getDb } from '~/.server/db'

export const handle = { access: { loader: 'public' } satisfies RouteAccess }

export function loader() {
  try {
    getDb().$client.prepare('select 1').get()
    return Response.json({ ok: true }, { headers: { 'Cache-Control': 'no-store' } })
  } catch (error) {
    return Response.json({ ok: false, error: 'database unavailable' }, { status: 503 })
  }
}
