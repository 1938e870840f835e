import { requireUser } from '~/.server/auth'
import { getDb } from '~/.server/db'
import { parseQuery, runList } from '~/.server/list-query'
import { siteList, siteQuery, type SiteQuery } from '~/.server/lists/sites'
import { officeToday } from '~/.server/today'
import type { RouteAccess } from '~/domain/permissions'
import type { Route } from './+types/api.sites'

export const handle = { access: { loader: 'view:fleet' } satisfies RouteAccess }

export async function loader({ request }: Route.LoaderArgs) {
  await requireUser(request, 'view:fleet')
  const query: SiteQuery = { ...parseQuery(siteQuery, request), today: officeToday() }
  return Response.json(runList(getDb(), siteList, query))
}
