import { requireUser } from '~/.server/auth'
import { getDb } from '~/.server/db'
import { notFound, recordId, unitRecord } from '~/.server/repos/records'
import type { RouteAccess } from '~/domain/permissions'
import type { Route } from './+types/api.units.$unitId'

export const handle = { access: { loader: 'view:fleet' } satisfies RouteAccess }

export async function loader({ request, params }: Route.LoaderArgs) {
  await requireUser(request, 'view:fleet')
  const record = unitRecord(getDb(), recordId(params, 'unitId'))
  return record ? Response.json(record) : notFound('unit')
}
