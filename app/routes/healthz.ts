import { getDb } from '~/.server/db'

export function loader() {
  try {
    getDb().$client.prepare('select 1').get()
    return Response.json({ ok: true }, { headers: { 'Cache-Control': 'no-store' } })
  } catch (error) {
    return Response.json({ ok: false, error: 'database unavailable' }, { status: 503 })
  }
}
