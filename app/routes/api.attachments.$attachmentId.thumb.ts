import { attachmentById, serveStored } from '~/.server/attachments'
import { requireUser } from '~/.server/auth'
import { getDb } from '~/.server/db'
import { notFound, recordId } from '~/.server/repos/record-id'
import type { RouteAccess } from '~/domain/permissions'
import type { Route } from './+types/api.attachments.$attachmentId.thumb'

export const handle = { access: { loader: 'view:fleet' } satisfies RouteAccess }

export async function loader({ request, params }: Route.LoaderArgs) {
  await requireUser(request, 'view:fleet')
  const file = attachmentById(getDb(), recordId(params, 'attachmentId'))
  if (!file) return notFound('attachment')
  if (!file.thumbKey) return Response.json({ error: 'This attachment has no thumbnail (documents have none).' }, { status: 404 })
  const name = `${file.fileName.replace(/\.[^.]*$/, '')}-thumb.jpg`
  return serveStored(file.thumbKey, 'image/jpeg', name)
}
