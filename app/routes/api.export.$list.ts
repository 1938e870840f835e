import { requireUser } from '~/.server/auth'
import { exportCsv, exportListParam } from '~/.server/csv/export'
import { getDb } from '~/.server/db'
import { officeToday } from '~/.server/today'
import type { RouteAccess } from '~/domain/permissions'
import type { Route } from './+types/api.export.$list'

// Readable by whoever may read the list itself.
export const handle = { access: { loader: 'view:fleet' } satisfies RouteAccess, sampleParams: { list: 'customers' } }

/** Every row of a list under its current filter and sort, as a CSV download. */
export async function loader({ request, params }: Route.LoaderArgs) {
  await requireUser(request, 'view:fleet')
  const list = exportListParam.safeParse(params.list)
  if (!list.success) return Response.json({ error: list.error.issues[0].message }, { status: 404 })
  const body = exportCsv(getDb(), list.data, request)
  return new Response(body, {
    status: 200,
    headers: {
      'Content-Type': 'text/csv; charset=utf-8',
      'Content-Disposition': `attachment; filename="ductkeeper-${list.data}-${officeToday()}.csv"`,
      'Cache-Control': 'private, no-store',
      'X-Content-Type-Options': 'nosniff',
    },
  })
}
