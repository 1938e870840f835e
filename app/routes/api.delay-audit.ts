import { requireUser } from '~/.server/auth'
import { getDb } from '~/.server/db'
import { auditCsv, auditPage, auditQuery } from '~/.server/repos/delay-audit'
import { officeToday } from '~/.server/today'
import type { RouteAccess } from '~/domain/permissions'
import type { Route } from './+types/api.delay-audit'

export const handle = { access: { loader: 'schedule:visits' } satisfies RouteAccess }

/** GET /api/delay-audit?outcome=&page= — counts and one page of sites; with format=csv, every detector of the outcome. */
export async function loader({ request }: Route.LoaderArgs) {
  await requireUser(request, 'schedule:visits')
  const params = new URL(request.url).searchParams
  const q = auditQuery.parse(Object.fromEntries(params))
  if (params.get('format') !== 'csv') return Response.json(auditPage(getDb(), q.outcome, q.page))
  return new Response(auditCsv(getDb(), q.outcome), {
    headers: {
      'Content-Type': 'text/csv; charset=utf-8',
      'Content-Disposition': `attachment; filename="ductkeeper-delay-${q.outcome}-${officeToday()}.csv"`,
      'Cache-Control': 'private, no-store',
      'X-Content-Type-Options': 'nosniff',
    },
  })
}
