import { requireUser } from '~/.server/auth'
import { getDb } from '~/.server/db'
import { notFound, recordId } from '~/.server/repos/record-id'
import { editFromRequest, editResponse } from '~/.server/repos/record-edits'
import { unitRecord } from '~/.server/repos/unit'
import type { RouteAccess } from '~/domain/permissions'
import type { Route } from './+types/api.units.$unitId'

export const handle = { access: { loader: 'view:fleet', action: 'edit:records' } satisfies RouteAccess }

/** The unit page's data as JSON: the same repo call, so the figures cannot differ. */
export async function loader({ request, params }: Route.LoaderArgs) {
  await requireUser(request, 'view:fleet')
  const record = unitRecord(getDb(), recordId(params, 'unitId'))
  return record ? Response.json(record) : notFound('unit')
}

/** PATCH (or POST) the unit's fields with the `version` read: 200 with the record, 400 with field errors, 409 with the current record. */
export async function action({ request, params }: Route.ActionArgs) {
  const user = await requireUser(request, 'edit:records')
  return editResponse(await editFromRequest(request, 'unit', user.id, recordId(params, 'unitId')))
}
