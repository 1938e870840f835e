import { requireUser } from '~/.server/auth'
import { getDb } from '~/.server/db'
import { notFound, recordId, siteRecord } from '~/.server/repos/records'
import { officeToday } from '~/.server/today'
import type { RouteAccess } from '~/domain/permissions'
import type { Route } from './+types/api.sites.$siteId'

export const handle = { access: { loader: 'view:fleet' } satisfies RouteAccess }

export async function loader({ request, params }: Route.LoaderArgs) {
  await requireUser(request, 'view:fleet')
  const record = siteRecord(getDb(), recordId(params, 'siteId'), officeToday())
  return record ? Response.json(record) : notFound('site')
}
