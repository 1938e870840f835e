import { z } from 'zod'
import { requireUser } from '~/.server/auth'
import { ImportRefusal } from '~/.server/csv/read'
import { columnIndexes } from '~/.server/csv/parse-rows'
import { checkImport, commitImport } from '~/.server/csv/run'
import { importIdParam, loadImport, removeImport } from '~/.server/csv/store'
import { getDb } from '~/.server/db'
import { methodNotAllowed, readJson } from '~/.server/http'
import { officeToday } from '~/.server/today'
import { mappingSchema } from '~/domain/import-schemas'
import type { RouteAccess } from '~/domain/permissions'
import type { Route } from './+types/api.import.$importId'

// Served only by POST; `methods` tells the route × role test that a GET answers 405.
export const handle = { access: { loader: 'edit:records', action: 'edit:records' } satisfies RouteAccess, methods: ['POST'] as const }

/** A GET is refused as a method the route does not serve, not as a malformed request. */
export async function loader({ request }: Route.LoaderArgs) {
  await requireUser(request, 'edit:records')
  return methodNotAllowed(request, handle.methods)
}

const body = z.discriminatedUnion('intent', [
  z.object({ intent: z.literal('check'), mapping: mappingSchema }),
  z.object({ intent: z.literal('commit'), mapping: mappingSchema }),
  z.object({ intent: z.literal('discard') }),
])

const encoder = new TextEncoder()

/**
 * `check` reads the whole file against the records and answers with the report, streamed as lines of
 * JSON (`{"progress":n}` every 1,000 rows, then `{"report":…}`) so a long file shows its progress.
 * `commit` writes the sound rows in one transaction and answers with the same report. `discard`
 * drops the upload.
 */
export async function action({ request, params }: Route.ActionArgs) {
  const user = await requireUser(request, 'edit:records')
  if (request.method !== 'POST') return methodNotAllowed(request, handle.methods)
  const id = importIdParam.safeParse(params.importId)
  if (!id.success) return Response.json({ error: 'That upload is not kept here. Upload the file again.' }, { status: 404 })
  const input = await readJson(request, body)
  try {
    const { meta, path } = loadImport(id.data, user.id)
    if (input.intent === 'discard') {
      removeImport(meta.id)
      return Response.json({ ok: true })
    }
    if (input.intent === 'commit') {
      const report = await commitImport(getDb(), meta, path, input.mapping, user.id, officeToday())
      removeImport(meta.id)
      return Response.json({ report })
    }
    // Checked before the stream starts, so a mapping without the needed columns is a plain 400.
    columnIndexes(meta.kind, meta.headers, input.mapping)
    const stream = new ReadableStream<Uint8Array>({
      async start(controller) {
        const send = (value: unknown) => controller.enqueue(encoder.encode(JSON.stringify(value) + '\n'))
        try {
          const report = await checkImport(getDb(), meta, path, input.mapping, async (n) => {
            send({ progress: n, of: meta.rows })
            // Hands the loop back so the line goes out while the rest is read.
            await new Promise((resolve) => setImmediate(resolve))
          })
          send({ report })
        } catch (error) {
          send({ error: error instanceof ImportRefusal ? error.message : 'The file could not be checked.' })
          if (!(error instanceof ImportRefusal)) console.warn('import check failed', error)
        }
        controller.close()
      },
    })
    return new Response(stream, { headers: { 'Content-Type': 'application/x-ndjson; charset=utf-8', 'Cache-Control': 'no-store' } })
  } catch (error) {
    if (error instanceof ImportRefusal) return Response.json({ error: error.message }, { status: error.status })
    throw error
  }
}
