import { requireUser } from '~/.server/auth'
import { getDb } from '~/.server/db'
import { notFound, recordId } from '~/.server/repos/record-id'
import { editFromRequest, editResponse } from '~/.server/repos/record-edits'
import { siteRecord } from '~/.server/repos/site'
import { officeToday } from '~/.server/today'
import type { RouteAccess } from '~/domain/permissions'
import type { Route } from './+types/api.sites.$siteId'

export const handle = { access: { loader: 'view:fleet', action: 'edit:records' } satisfies RouteAccess }

/** The site page's data as JSON: the same repo call, so the figures cannot differ. */
export async function loader({ request, params }: Route.LoaderArgs) {
  await requireUser(request, 'view:fleet')
  const record = siteRecord(getDb(), recordId(params, 'siteId'), officeToday())
  return record ? Response.json(record) : notFound('site')
}

/** PATCH (or POST) the site's fields with the `version` read: 200 with the record, 400 with field errors, 409 with the current record. */
export async function action({ request, params }: Route.ActionArgs) {
  const user = await requireUser(request, 'edit:records')
  return editResponse(await editFromRequest(request, 'site', user.id, recordId(params, 'siteId')))
}
