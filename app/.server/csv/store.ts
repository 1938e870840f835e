import Busboy from 'busboy'
import { randomUUID } from 'node:crypto'
import { createWriteStream, mkdirSync, readdirSync, readFileSync, rmSync, statSync, writeFileSync } from 'node:fs'
import { dirname, join, resolve } from 'node:path'
import { Readable } from 'node:stream'
import { finished } from 'node:stream/promises'
import { z } from 'zod'
import { IMPORT_KINDS, type ImportKind } from '~/domain/import-schemas'
import { env } from '../env'
import { ImportRefusal } from './read'

const MB = 1024 * 1024
/** The largest CSV taken: 50,000 inventory rows are about 15 MB. */
export const MAX_CSV_BYTES = 40 * MB
// An upload not confirmed within this long is dropped.
const KEEP_MS = 24 * 60 * 60 * 1000

/**
 * Uploaded files wait here between the check and the confirmation, beside the database (not in
 * memory: a 50,000-row file is read twice, and the server may restart in between).
 */
export function importsDir(): string {
  return resolve(join(dirname(process.env.DATABASE_PATH ?? env.DATABASE_PATH), 'imports'))
}

const ID = /^[0-9a-f-]{36}$/
export const importIdParam = z.string().regex(ID, 'Not an upload id')

export interface StoredImport {
  id: string
  kind: ImportKind
  source: string
  fileName: string
  userId: number
  delimiter: string
  headers: string[]
  rows: number
  at: string
}

const csvPath = (id: string) => join(importsDir(), `${id}.csv`)
const metaPath = (id: string) => join(importsDir(), `${id}.json`)

export const uploadFields = z.object({
  kind: z.enum(IMPORT_KINDS, { error: 'Choose what the file holds: inventory or events' }),
  source: z
    .string()
    .trim()
    .min(1, 'Name the source of the file (the customer or monitoring company it came from)')
    .max(120, 'At most 120 characters for the source'),
})

/** Drops uploads older than a day (and any left half-written by a crash). */
export function sweepImports(now = Date.now()) {
  const dir = importsDir()
  let names: string[]
  try {
    names = readdirSync(dir)
  } catch {
    return
  }
  for (const name of names) {
    const path = join(dir, name)
    try {
      if (now - statSync(path).mtimeMs > KEEP_MS) rmSync(path, { force: true })
    } catch {
      // Removed by another request meanwhile.
    }
  }
}

/**
 * Streams the multipart body's one file (field `file`) to disk under a new id, with the form's
 * fields, which must come before it. Refuses past MAX_CSV_BYTES, removing what was written.
 */
export function receiveCsv(request: Request): Promise<{ id: string; path: string; fileName: string; fields: Record<string, string> }> {
  const type = request.headers.get('Content-Type') ?? ''
  if (type.split(';')[0].trim().toLowerCase() !== 'multipart/form-data') {
    return Promise.reject(new ImportRefusal(415, 'Send the CSV file as multipart/form-data in the field "file".'))
  }
  if (Number(request.headers.get('Content-Length') ?? 0) > MAX_CSV_BYTES + MB) {
    return Promise.reject(new ImportRefusal(413, `The file is larger than ${MAX_CSV_BYTES / MB} MB; split it and import the parts.`))
  }
  if (!request.body) return Promise.reject(new ImportRefusal(400, 'The request has no file.'))
  mkdirSync(importsDir(), { recursive: true })
  const id = randomUUID()
  const path = csvPath(id)
  const fields: Record<string, string> = {}
  const source = Readable.fromWeb(request.body as import('node:stream/web').ReadableStream)
  return new Promise<{ id: string; path: string; fileName: string; fields: Record<string, string> }>((done, reject) => {
    let bb: Busboy.Busboy
    try {
      bb = Busboy({ headers: { 'content-type': type }, limits: { fileSize: MAX_CSV_BYTES, files: 1, fields: 5, fieldSize: 1024 }, defParamCharset: 'utf8' })
    } catch {
      return reject(new ImportRefusal(400, 'The multipart body could not be read.'))
    }
    let fileName: string | null = null
    let writing: Promise<unknown> | null = null
    let failed = false
    const fail = (refusal: ImportRefusal) => {
      if (failed) return
      failed = true
      source.unpipe(bb)
      source.resume()
      void Promise.allSettled([writing]).then(() => {
        rmSync(path, { force: true })
        reject(refusal)
      })
    }
    bb.on('field', (name, value) => (fields[name] = value))
    bb.on('file', (field, stream, info) => {
      if (field !== 'file' || writing) {
        stream.resume()
        return
      }
      fileName = (info.filename ?? 'upload.csv').split(/[/\\]/).pop()!.replace(/[\p{Cc}"]/gu, '').slice(0, 120) || 'upload.csv'
      const out = createWriteStream(path)
      stream.on('limit', () => {
        out.destroy()
        fail(new ImportRefusal(413, `The file is larger than ${MAX_CSV_BYTES / MB} MB; split it and import the parts.`))
      })
      out.on('error', () => fail(new ImportRefusal(500, 'The upload could not be written to storage.')))
      stream.pipe(out)
      writing = finished(out)
    })
    bb.on('error', () => fail(new ImportRefusal(400, 'The upload was cut off before it finished.')))
    bb.on('close', () => {
      if (failed) return
      if (!writing || fileName === null) return fail(new ImportRefusal(400, 'Choose a CSV file to upload (the field "file" was empty).'))
      writing.then(
        () => done({ id, path, fileName: fileName!, fields }),
        () => fail(new ImportRefusal(500, 'The upload could not be written to storage.')),
      )
    })
    source.on('error', () => fail(new ImportRefusal(400, 'The upload was cut off before it finished.')))
    source.pipe(bb)
  })
}

export function saveImport(meta: StoredImport) {
  writeFileSync(metaPath(meta.id), JSON.stringify(meta))
}

/** The upload and its file, for the person who made it; 404 for anyone else or once it is gone. */
export function loadImport(id: string, userId: number): { meta: StoredImport; path: string } {
  let meta: StoredImport
  try {
    meta = JSON.parse(readFileSync(metaPath(id), 'utf8')) as StoredImport
  } catch {
    throw new ImportRefusal(404, 'That upload is no longer kept (it was imported, discarded or is over a day old). Upload the file again.')
  }
  if (meta.userId !== userId) throw new ImportRefusal(404, 'That upload is no longer kept. Upload the file again.')
  return { meta, path: csvPath(id) }
}

export function removeImport(id: string) {
  rmSync(csvPath(id), { force: true })
  rmSync(metaPath(id), { force: true })
}
