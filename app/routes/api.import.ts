import { requireUser } from '~/.server/auth'
import { ImportRefusal, scanFile, sniffDelimiter } from '~/.server/csv/read'
import { mappingFor } from '~/.server/csv/run'
import { receiveCsv, removeImport, saveImport, sweepImports, uploadFields } from '~/.server/csv/store'
import { getDb } from '~/.server/db'
import { methodNotAllowed } from '~/.server/http'
import { FIELDS_OF } from '~/domain/import-schemas'
import type { RouteAccess } from '~/domain/permissions'
import type { Route } from './+types/api.import'

// Served only by POST; `methods` tells the route × role test that a GET answers 405.
export const handle = { access: { loader: 'edit:records', action: 'edit:records' } satisfies RouteAccess, methods: ['POST'] as const }

/** A GET is refused as a method the route does not serve, not as a missing upload. */
export async function loader({ request }: Route.LoaderArgs) {
  await requireUser(request, 'edit:records')
  return methodNotAllowed(request, handle.methods)
}

/**
 * Takes the CSV (multipart: `kind`, `source`, then `file`), keeps it under an id and answers with
 * its columns, a few rows, the row count and the mapping to start from. Nothing is imported yet.
 */
export async function action({ request }: Route.ActionArgs) {
  const user = await requireUser(request, 'edit:records')
  if (request.method !== 'POST') return methodNotAllowed(request, handle.methods)
  sweepImports()
  let upload: Awaited<ReturnType<typeof receiveCsv>> | null = null
  try {
    upload = await receiveCsv(request)
    const fields = uploadFields.safeParse(upload.fields)
    if (!fields.success) throw new ImportRefusal(400, fields.error.issues[0].message)
    const delimiter = await sniffDelimiter(upload.path)
    const scan = await scanFile(upload.path, delimiter)
    const meta = {
      id: upload.id,
      kind: fields.data.kind,
      source: fields.data.source,
      fileName: upload.fileName,
      userId: user.id,
      delimiter,
      headers: scan.headers,
      rows: scan.rows,
      at: new Date().toISOString(),
    }
    saveImport(meta)
    const { mapping, remembered } = mappingFor(getDb(), meta.kind, meta.source, scan.headers)
    return Response.json(
      { id: meta.id, kind: meta.kind, source: meta.source, fileName: meta.fileName, headers: scan.headers, sample: scan.sample, rows: scan.rows, mapping, remembered, fields: FIELDS_OF[meta.kind] },
      { status: 201 },
    )
  } catch (error) {
    if (upload) removeImport(upload.id)
    if (error instanceof ImportRefusal) return Response.json({ error: error.message }, { status: error.status })
    throw error
  }
}
