import { requireUser } from '~/.server/auth'
import { getDb } from '~/.server/db'
import { notFound, recordId } from '~/.server/repos/record-id'
import { siteRecord } from '~/.server/repos/site'
import { officeToday } from '~/.server/today'
import type { RouteAccess } from '~/domain/permissions'
import type { Route } from './+types/api.sites.$siteId'

export const handle = { access: { loader: 'view:fleet' } satisfies RouteAccess }

/** The site page's data as JSON: the same repo call, so the figures cannot differ. */
export async function loader({ request, params }: Route.LoaderArgs) {
  await requireUser(request, 'view:fleet')
  const record = siteRecord(getDb(), recordId(params, 'siteId'), officeToday())
  return record ? Response.json(record) : notFound('site')
}
