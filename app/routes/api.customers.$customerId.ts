import { requireUser } from '~/.server/auth'
import { getDb } from '~/.server/db'
import { customerRecord } from '~/.server/repos/customer'
import { notFound, recordId } from '~/.server/repos/record-id'
import { officeToday } from '~/.server/today'
import type { RouteAccess } from '~/domain/permissions'
import type { Route } from './+types/api.customers.$customerId'

export const handle = { access: { loader: 'view:fleet' } satisfies RouteAccess }

/** The customer page's data as JSON: the same repo call, so the figures cannot differ. */
export async function loader({ request, params }: Route.LoaderArgs) {
  await requireUser(request, 'view:fleet')
  const record = customerRecord(getDb(), recordId(params, 'customerId'), officeToday())
  return record ? Response.json(record) : notFound('customer')
}
