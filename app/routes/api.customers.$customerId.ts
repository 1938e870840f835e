import { requireUser } from '~/.server/auth'
import { getDb } from '~/.server/db'
import { customerRecord } from '~/.server/repos/customer'
import { notFound, recordId } from '~/.server/repos/record-id'
import { editFromRequest, editResponse } from '~/.server/repos/record-edits'
import { officeToday } from '~/.server/today'
import type { RouteAccess } from '~/domain/permissions'
import type { Route } from './+types/api.customers.$customerId'

export const handle = { access: { loader: 'view:fleet', action: 'edit:records' } satisfies RouteAccess }

/** The customer page's data as JSON: the same repo call, so the figures cannot differ. */
export async function loader({ request, params }: Route.LoaderArgs) {
  await requireUser(request, 'view:fleet')
  const record = customerRecord(getDb(), recordId(params, 'customerId'), officeToday())
  return record ? Response.json(record) : notFound('customer')
}

/** PATCH (or POST) the customer's fields with the `version` read: 200 with the record, 400 with field errors, 409 with the current record. */
export async function action({ request, params }: Route.ActionArgs) {
  const user = await requireUser(request, 'edit:records')
  return editResponse(await editFromRequest(request, 'customer', user.id, recordId(params, 'customerId')))
}
