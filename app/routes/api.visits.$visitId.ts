import { requireUser } from '~/.server/auth'
import { getDb } from '~/.server/db'
import { notFound, recordId } from '~/.server/repos/record-id'
import { visitRecord } from '~/.server/repos/visit'
import type { RouteAccess } from '~/domain/permissions'
import type { Route } from './+types/api.visits.$visitId'

export const handle = { access: { loader: 'view:fleet' } satisfies RouteAccess }

export async function loader({ request, params }: Route.LoaderArgs) {
  await requireUser(request, 'view:fleet')
  const record = visitRecord(getDb(), recordId(params, 'visitId'))
  return record ? Response.json(record) : notFound('visit')
}
