import Busboy from 'busboy'
import { fileTypeFromBuffer } from 'file-type'
import { randomUUID } from 'node:crypto'
import { chmodSync, createReadStream, createWriteStream, mkdirSync, readdirSync, renameSync, rmSync, statSync } from 'node:fs'
import { dirname, join, resolve } from 'node:path'
import { Readable } from 'node:stream'
import { finished } from 'node:stream/promises'
import sharp from 'sharp'
import { and, asc, eq, inArray } from 'drizzle-orm'
import { z } from 'zod'
import { can } from '~/domain/permissions'
import { sizeInWords, UPLOAD_LIMITS } from '~/utils/upload-limits'
import { writeAudit } from './audit'
import type { CurrentUser } from './auth'
import { writeTx, type Db } from './db'
import { env } from './env'
import { listsChanged } from './list-query'
import { attachments, events, visitDetectors, visits } from './schema'

const MB = 1024 * 1024

const THUMB_PX = 320

// What may be stored, by the type its bytes show. HEIC is what many phones take; this sharp build
// reads AVIF but has no HEVC decoder, so a HEIC that sharp cannot open is kept without a thumbnail.
const ALLOWED = {
  'image/jpeg': { ext: 'jpg', image: true },
  'image/png': { ext: 'png', image: true },
  'image/webp': { ext: 'webp', image: true },
  'image/heic': { ext: 'heic', image: true },
  'image/heif': { ext: 'heif', image: true },
  'application/pdf': { ext: 'pdf', image: false },
} as const
type AllowedType = keyof typeof ALLOWED
const isAllowed = (mime: string): mime is AllowedType => mime in ALLOWED
const ALLOWED_WORDS = 'JPEG, PNG, WebP or HEIC photos, or PDF documents'

// file-type reads at most this many bytes from the start of a file to tell its type.
const SNIFF_BYTES = 4100

// Stored names are made here, never taken from a client: anything else is refused before it is joined to the folder.
const KEY_PATTERN = /^[0-9a-f-]{36}(\.thumb)?\.(jpg|png|webp|heic|heif|pdf)$/

/** The folder that holds the files: ATTACHMENTS_DIR, else `attachments` beside the database file. */
export function attachmentsDir(): string {
  return resolve(env.ATTACHMENTS_DIR ?? join(dirname(process.env.DATABASE_PATH ?? env.DATABASE_PATH), 'attachments'))
}

/** A refusal with its status and a message in words; the route turns it into JSON. */
class Refusal extends Error {
  constructor(
    readonly status: number,
    message: string,
  ) {
    super(message)
  }
}

/**
 * The name to show: the last part of whatever path the client sent, with control characters and
 * leading dots removed. It is only ever shown or put in a header, never used to find the file.
 */
function displayName(raw: string, ext: string): string {
  const base = raw.split(/[/\\]/).pop() ?? ''
  const clean = base
    .replace(/[\p{Cc}\p{Cf}"]/gu, '')
    .replace(/\s+/g, ' ')
    .replace(/^[.\s]+/, '')
    .trim()
    .slice(0, 120)
  return clean || `upload.${ext}`
}

/** `Content-Disposition: inline` with an ASCII fallback and the UTF-8 name. */
function inlineDisposition(name: string): string {
  const ascii = name.replace(/[^\x20-\x7e]|[\\"%]/g, '_')
  return `inline; filename="${ascii}"; filename*=UTF-8''${encodeURIComponent(name)}`
}

interface Received {
  tempPath: string
  clientName: string
  size: number
  head: Buffer
}

interface IncomingFile {
  tempPath: string
  thumbTempPath: string | null
  name: string
  contentType: AllowedType
  ext: string
  size: number
}

// Unread bodies are read and dropped so the client, still sending, gets the answer: closing a socket
// with unread data resets it, and the reset can destroy the answer. Past these bounds it is cut.
const DISCARD_BYTES = UPLOAD_LIMITS.requestBytes + 8 * MB
const DISCARD_MS = 10_000

function discard(source: Readable) {
  let dropped = 0
  const timer = setTimeout(() => source.destroy(), DISCARD_MS)
  timer.unref()
  source.on('data', (chunk: Buffer) => {
    dropped += chunk.length
    if (dropped > DISCARD_BYTES) source.destroy()
  })
  source.on('error', () => {})
  source.on('close', () => clearTimeout(timer))
  source.resume()
}

/** Refuses a request whose body has not been read, dropping the body in the background. */
function refuseUnread(request: Request, status: number, message: string): never {
  if (request.body && !request.bodyUsed && !request.body.locked) discard(Readable.fromWeb(request.body as import('node:stream/web').ReadableStream))
  throw new Refusal(status, message)
}

/** 415 unless the body is multipart/form-data with a boundary; 413 when its declared length is too large. */
export function checkUploadHeaders(request: Request) {
  const type = request.headers.get('Content-Type') ?? ''
  if (type.split(';')[0].trim().toLowerCase() !== 'multipart/form-data' || !/boundary=/i.test(type)) {
    refuseUnread(request, 415, `${type ? `A ${type.split(';')[0]} body is not accepted here.` : 'The request has no Content-Type.'} Send the files as multipart/form-data in the field "file".`)
  }
  const declared = Number(request.headers.get('Content-Length') ?? 0)
  if (declared > UPLOAD_LIMITS.requestBytes + MB) {
    refuseUnread(request, 413, `The upload is larger than ${sizeInWords(UPLOAD_LIMITS.requestBytes)} in all; send fewer files at a time.`)
  }
}

function removeQuietly(path: string | null) {
  if (path) rmSync(path, { force: true })
}

/**
 * Streams the multipart body into temporary files in `dir`, counting as it goes: a file past the
 * per-file limit, the request past its total or too many files stop the reading at once, and every
 * temporary file made so far is removed. Resolves with the fields and the files as received.
 */
function receive(request: Request, dir: string): Promise<{ fields: Record<string, string>; files: Received[] }> {
  const source = Readable.fromWeb(request.body as import('node:stream/web').ReadableStream)
  const files: Received[] = []
  const fields: Record<string, string> = {}
  const writing: Promise<unknown>[] = []
  const temps: string[] = []
  const open: Readable[] = []
  const outs: import('node:fs').WriteStream[] = []
  let total = 0
  let failed: Refusal | null = null

  return new Promise((resolvePromise, reject) => {
    let bb: Busboy.Busboy
    try {
      bb = Busboy({
        headers: { 'content-type': request.headers.get('Content-Type') ?? '' },
        limits: { fileSize: UPLOAD_LIMITS.fileBytes, files: UPLOAD_LIMITS.files, fields: 10, fieldSize: 1024, parts: UPLOAD_LIMITS.files + 10 },
        defParamCharset: 'utf8',
      })
    } catch {
      return reject(new Refusal(400, 'The multipart body could not be read.'))
    }

    const fail = (refusal: Refusal) => {
      if (failed) return
      failed = refusal
      source.unpipe(bb)
      bb.removeAllListeners()
      bb.on('error', () => {})
      // Files half-written stop here: their streams are closed so the temp files can be removed.
      for (const s of open) s.destroy()
      for (const o of outs) o.destroy()
      discard(source)
      void Promise.allSettled(writing).then(() => {
        temps.forEach(removeQuietly)
        reject(refusal)
      })
    }

    bb.on('field', (name, value) => {
      fields[name] = value
    })
    bb.on('file', (field, stream, info) => {
      if (field !== 'file') {
        stream.resume()
        return fail(new Refusal(400, `Send files in the field "file" (got "${field.slice(0, 40)}").`))
      }
      const tempPath = join(dir, `.incoming-${randomUUID()}`)
      temps.push(tempPath)
      const received: Received = { tempPath, clientName: info.filename ?? '', size: 0, head: Buffer.alloc(0) }
      const heads: Buffer[] = []
      let headBytes = 0
      // Site photos and records are the customer's: readable by the server's own account only.
      const out = createWriteStream(tempPath, { mode: 0o600 })
      open.push(stream)
      outs.push(out)
      stream.on('data', (chunk: Buffer) => {
        received.size += chunk.length
        total += chunk.length
        if (headBytes < SNIFF_BYTES) {
          heads.push(chunk)
          headBytes += chunk.length
        }
        if (total > UPLOAD_LIMITS.requestBytes) fail(new Refusal(413, `The upload is larger than ${sizeInWords(UPLOAD_LIMITS.requestBytes)} in all; send fewer files at a time.`))
      })
      stream.on('limit', () => fail(new Refusal(413, `"${displayName(received.clientName, 'file')}" is larger than ${sizeInWords(UPLOAD_LIMITS.fileBytes)}, the limit for one file.`)))
      // A disk that fails mid-file would otherwise stall the parser behind the unpiped stream.
      out.on('error', () => fail(new Refusal(500, 'The upload could not be written to storage.')))
      stream.pipe(out)
      files.push(received)
      writing.push(
        finished(out).then(() => {
          received.head = Buffer.concat(heads).subarray(0, SNIFF_BYTES)
        }),
      )
    })
    bb.on('filesLimit', () => fail(new Refusal(413, `Send at most ${UPLOAD_LIMITS.files} files at a time.`)))
    bb.on('partsLimit', () => fail(new Refusal(413, 'The form has too many parts.')))
    bb.on('fieldsLimit', () => fail(new Refusal(413, 'The form has too many fields.')))
    bb.on('error', () => fail(new Refusal(400, 'The multipart body could not be read; it may have been cut off.')))
    bb.on('close', () => {
      if (failed) return
      Promise.all(writing).then(
        () => (failed ? undefined : resolvePromise({ fields, files })),
        () => fail(new Refusal(500, 'The upload could not be written to storage.')),
      )
    })
    source.on('error', () => fail(new Refusal(400, 'The upload was cut off before it finished.')))
    source.pipe(bb)
  }).catch((error: unknown) => {
    temps.forEach(removeQuietly)
    throw error
  }) as Promise<{ fields: Record<string, string>; files: Received[] }>
}

/** Reads the bytes' own type, makes the thumbnail; refuses (removing its temp files) what is not allowed. */
async function check(file: Received): Promise<IncomingFile> {
  const shown = displayName(file.clientName, 'file')
  if (file.size === 0) throw new Refusal(400, `The file is empty: "${shown}".`)
  const found = await fileTypeFromBuffer(file.head)
  if (!found || !isAllowed(found.mime)) {
    const what = found ? `${found.mime} (.${found.ext})` : 'a file of no recognised type'
    throw new Refusal(415, `"${shown}" is ${what}; only ${ALLOWED_WORDS} can be attached.`)
  }
  const { ext, image } = ALLOWED[found.mime]
  let thumbTempPath: string | null = null
  if (image) {
    thumbTempPath = `${file.tempPath}.thumb`
    try {
      await sharp(file.tempPath)
        .rotate() // upright by the camera's EXIF orientation
        .resize({ width: THUMB_PX, height: THUMB_PX, fit: 'inside', withoutEnlargement: true })
        .jpeg({ quality: 78, mozjpeg: true })
        .toFile(thumbTempPath)
      chmodSync(thumbTempPath, 0o600)
    } catch {
      removeQuietly(thumbTempPath)
      thumbTempPath = null
      const heic = found.mime === 'image/heic' || found.mime === 'image/heif'
      if (!heic) throw new Refusal(400, `"${shown}" could not be read as an image; it may be damaged.`)
    }
  }
  return { tempPath: file.tempPath, thumbTempPath, name: displayName(file.clientName, ext), contentType: found.mime, ext, size: file.size }
}

const uploadFields = z.object({
  detectorId: z.preprocess((v) => (v === '' ? undefined : v), z.coerce.number().int().positive().optional()),
})

interface AttachmentView {
  id: number
  visitId: number | null
  detectorId: number | null
  fileName: string
  contentType: string
  sizeBytes: number
  uploadedAt: string
  uploadedBy: number | null
  url: string
  thumbUrl: string | null
}

type AttachmentRow = Omit<AttachmentView, 'url' | 'thumbUrl'> & { thumbKey: string | null }

const view = (r: AttachmentRow): AttachmentView => ({
  id: r.id,
  visitId: r.visitId,
  detectorId: r.detectorId,
  fileName: r.fileName,
  contentType: r.contentType,
  sizeBytes: r.sizeBytes,
  uploadedAt: r.uploadedAt,
  uploadedBy: r.uploadedBy,
  url: `/api/attachments/${r.id}`,
  thumbUrl: r.thumbKey ? `/api/attachments/${r.id}/thumb` : null,
})

const columns = {
  id: attachments.id,
  visitId: attachments.visitId,
  detectorId: attachments.detectorId,
  fileName: attachments.fileName,
  contentType: attachments.contentType,
  sizeBytes: attachments.sizeBytes,
  thumbKey: attachments.thumbKey,
  uploadedAt: attachments.uploadedAt,
  uploadedBy: attachments.uploadedBy,
}

/** A visit's attachments, oldest first. */
export function visitAttachments(db: Db, visitId: number): AttachmentView[] {
  return db.select(columns).from(attachments).where(eq(attachments.visitId, visitId)).orderBy(asc(attachments.id)).all().map(view)
}

let swept = false

/** Temp files left by a server stopped mid-upload are removed once per process, when uploads begin. */
function sweepOnce(dir: string) {
  if (swept) return
  swept = true
  const before = Date.now() - 60 * 60 * 1000
  for (const name of readdirSync(dir)) {
    if (!name.startsWith('.incoming-')) continue
    const path = join(dir, name)
    try {
      if (statSync(path).mtimeMs < before) rmSync(path, { force: true })
    } catch {
      // already gone
    }
  }
}

interface VisitRef {
  id: number
  siteId: number
  technicianId: number | null
}

export function visitExists(db: Db, visitId: number): boolean {
  return db.select({ id: visits.id }).from(visits).where(eq(visits.id, visitId)).get() !== undefined
}

/** The visit an upload goes to, or null; 403 for a technician on a visit not assigned to them. */
export function uploadTarget(db: Db, visitId: number, user: CurrentUser): VisitRef | null {
  const visit = db.select({ id: visits.id, siteId: visits.siteId, technicianId: visits.technicianId }).from(visits).where(eq(visits.id, visitId)).get()
  if (!visit) return null
  if (!can(user.role, 'record:any-visit') && visit.technicianId !== user.id) {
    throw new Refusal(403, 'This visit is not assigned to you; only its technician or the office can add files to it.')
  }
  return visit
}

/**
 * Receives, checks and stores the files of one upload to a visit. Files go to temporary names first;
 * the rows, one audit entry and one event per file are written in one transaction, and only after it
 * commits are the files renamed into place. Any refusal or failure leaves no file and no row.
 */
export async function storeUpload(db: Db, request: Request, visit: VisitRef, user: CurrentUser): Promise<AttachmentView[]> {
  const dir = attachmentsDir()
  mkdirSync(dir, { recursive: true, mode: 0o700 })
  sweepOnce(dir)
  const { fields, files } = await receive(request, dir)
  const temps = files.flatMap((f) => [f.tempPath, `${f.tempPath}.thumb`])
  try {
    if (files.length === 0) throw new Refusal(400, 'No file was sent; attach photos or documents in the field "file".')
    const parsed = uploadFields.safeParse(fields)
    if (!parsed.success) throw new Refusal(400, 'detectorId must be a detector number.')
    const detectorId = parsed.data.detectorId ?? null
    if (detectorId !== null) {
      const covered = db
        .select({ visitId: visitDetectors.visitId })
        .from(visitDetectors)
        .where(and(eq(visitDetectors.visitId, visit.id), eq(visitDetectors.detectorId, detectorId)))
        .get()
      if (!covered) throw new Refusal(400, `Detector ${detectorId} is not covered by this visit.`)
    }
    const checked: IncomingFile[] = []
    for (const f of files) checked.push(await check(f))

    const placed = checked.map((f) => {
      const stem = randomUUID()
      return { ...f, storageKey: `${stem}.${f.ext}`, thumbKey: f.thumbTempPath ? `${stem}.thumb.jpg` : null }
    })
    const now = new Date().toISOString()
    const ids = writeTx(db, () =>
      placed.map((f) => {
        const { id } = db
          .insert(attachments)
          .values({ detectorId, visitId: visit.id, fileName: f.name, contentType: f.contentType, sizeBytes: f.size, storageKey: f.storageKey, thumbKey: f.thumbKey, uploadedBy: user.id, uploadedAt: now })
          .returning({ id: attachments.id })
          .get()
        writeAudit(db, { actorId: user.id, action: 'attachment.add', entity: 'attachment', entityId: id, after: { visitId: visit.id, detectorId, fileName: f.name, contentType: f.contentType, sizeBytes: f.size } })
        const word = f.contentType === 'application/pdf' ? 'Document' : 'Photo'
        db.insert(events).values({ siteId: visit.siteId, detectorId, occurredAt: now, kind: 'change', detail: `${word} added: ${f.name}`, userId: user.id }).run()
        return id
      }),
    )
    try {
      for (const f of placed) {
        renameSync(f.tempPath, join(dir, f.storageKey))
        if (f.thumbTempPath && f.thumbKey) renameSync(f.thumbTempPath, join(dir, f.thumbKey))
      }
    } catch (error) {
      // The rows are committed but a file did not reach its place: take the rows back out, so no
      // record points at a missing file.
      writeTx(db, () => db.delete(attachments).where(inArray(attachments.id, ids)).run())
      for (const f of placed) {
        removeQuietly(join(dir, f.storageKey))
        if (f.thumbKey) removeQuietly(join(dir, f.thumbKey))
      }
      throw error
    }
    listsChanged()
    return db.select(columns).from(attachments).where(inArray(attachments.id, ids)).orderBy(asc(attachments.id)).all().map(view)
  } finally {
    temps.forEach(removeQuietly)
  }
}

interface StoredFile {
  fileName: string
  contentType: string
  storageKey: string
  thumbKey: string | null
}

export function attachmentById(db: Db, id: number): StoredFile | null {
  const row = db
    .select({ fileName: attachments.fileName, contentType: attachments.contentType, storageKey: attachments.storageKey, thumbKey: attachments.thumbKey })
    .from(attachments)
    .where(eq(attachments.id, id))
    .get()
  return row ?? null
}

/**
 * Answers with a stored file, found by its stored key alone; 404 when the key is not one this module
 * makes or the file is gone.
 */
export function serveStored(key: string, contentType: string, name: string): Response {
  const missing = () => Response.json({ error: 'The file is missing from storage.' }, { status: 404 })
  if (!KEY_PATTERN.test(key)) return missing()
  const path = join(attachmentsDir(), key)
  let size: number
  try {
    size = statSync(path).size
  } catch {
    return missing()
  }
  const body = Readable.toWeb(createReadStream(path)) as ReadableStream
  return new Response(body, {
    headers: {
      'Content-Type': contentType,
      'Content-Length': String(size),
      'Content-Disposition': inlineDisposition(name),
      'X-Content-Type-Options': 'nosniff',
      // Stored files never change under their id; only this person's browser may keep them.
      'Cache-Control': 'private, max-age=86400',
    },
  })
}

/** A Refusal as the JSON answer every API route gives; anything else is thrown on. */
export function refusalResponse(error: unknown): Response {
  if (error instanceof Refusal) return Response.json({ error: error.message }, { status: error.status })
  throw error
}
