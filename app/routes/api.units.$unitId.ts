import { requireUser } from '~/.server/auth'
import { getDb } from '~/.server/db'
import { notFound, recordId } from '~/.server/repos/record-id'
import { unitRecord } from '~/.server/repos/unit'
import type { RouteAccess } from '~/domain/permissions'
import type { Route } from './+types/api.units.$unitId'

export const handle = { access: { loader: 'view:fleet' } satisfies RouteAccess }

/** The unit page's data as JSON: the same repo call, so the figures cannot differ. */
export async function loader({ request, params }: Route.LoaderArgs) {
  await requireUser(request, 'view:fleet')
  const record = unitRecord(getDb(), recordId(params, 'unitId'))
  return record ? Response.json(record) : notFound('unit')
}
