import { attachmentById, serveStored } from '~/.server/attachments'
import { requireUser } from '~/.server/auth'
import { getDb } from '~/.server/db'
import { notFound, recordId } from '~/.server/repos/record-id'
import type { RouteAccess } from '~/domain/permissions'
import type { Route } from './+types/api.attachments.$attachmentId'

export const handle = { access: { loader: 'view:fleet' } satisfies RouteAccess }

export async function loader({ request, params }: Route.LoaderArgs) {
  await requireUser(request, 'view:fleet')
  const file = attachmentById(getDb(), recordId(params, 'attachmentId'))
  return file ? serveStored(file.storageKey, file.contentType, file.fileName) : notFound('attachment')
}
