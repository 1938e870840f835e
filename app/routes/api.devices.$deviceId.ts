import { requireUser } from '~/.server/auth'
import { getDb } from '~/.server/db'
import { deviceReport } from '~/.server/device-report'
import { notFound, recordId } from '~/.server/repos/record-id'
import { editFromRequest, editResponse } from '~/.server/repos/record-edits'
import { officeToday } from '~/.server/today'
import type { RouteAccess } from '~/domain/permissions'
import type { Route } from './+types/api.devices.$deviceId'

export const handle = { access: { loader: 'view:fleet', action: 'edit:records' } satisfies RouteAccess }

/** The device page's data as JSON: the stored record and the trade engine's findings on it. */
export async function loader({ request, params }: Route.LoaderArgs) {
  await requireUser(request, 'view:fleet')
  const report = deviceReport(getDb(), recordId(params, 'deviceId'), officeToday())
  return report ? Response.json(report) : notFound('detector')
}

/** PATCH (or POST) the detector's fields with the `version` read: 200 with the record, 400 with field errors, 409 with the current record. */
export async function action({ request, params }: Route.ActionArgs) {
  const user = await requireUser(request, 'edit:records')
  return editResponse(await editFromRequest(request, 'detector', user.id, recordId(params, 'deviceId')))
}
