import { checkUploadHeaders, refusalResponse, storeUpload, uploadTarget, visitAttachments, visitExists } from '~/.server/attachments'
import { requireUser } from '~/.server/auth'
import { getDb } from '~/.server/db'
import { notFound, recordId } from '~/.server/repos/record-id'
import type { RouteAccess } from '~/domain/permissions'
import type { Route } from './+types/api.visits.$visitId.attachments'

export const handle = { access: { loader: 'view:fleet', action: 'record:work' } satisfies RouteAccess }

export async function loader({ request, params }: Route.LoaderArgs) {
  await requireUser(request, 'view:fleet')
  const visitId = recordId(params, 'visitId')
  const db = getDb()
  if (!visitExists(db, visitId)) return notFound('visit')
  return Response.json({ attachments: visitAttachments(db, visitId) })
}

/** Photos and documents for a visit, as multipart/form-data: files in `file`, optional `detectorId`. */
export async function action({ request, params }: Route.ActionArgs) {
  const user = await requireUser(request, 'record:work')
  try {
    if (request.method !== 'POST') return Response.json({ error: 'Send the files with POST.' }, { status: 405, headers: { Allow: 'GET, POST' } })
    const visitId = recordId(params, 'visitId')
    // The body's type and size are judged before anything is read.
    checkUploadHeaders(request)
    const db = getDb()
    const visit = uploadTarget(db, visitId, user)
    if (!visit) return notFound('visit')
    const attachments = await storeUpload(db, request, visit, user)
    return Response.json({ attachments }, { status: 201 })
  } catch (error) {
    return refusalResponse(error)
  }
}
