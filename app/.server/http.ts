import type { MiddlewareFunction } from 'react-router'
import { z } from 'zod'

/**
 * The largest JSON or form body any action reads. Real forms and API calls here are a few
 * kilobytes (500 ids at most); a megabyte leaves room and still keeps one request from filling memory.
 */
export const MAX_BODY_BYTES = 1024 * 1024

type Accepts = 'json' | 'form' | 'json-or-form'

const WANTED: Record<Accepts, string> = {
  json: 'Send the body as JSON (Content-Type: application/json).',
  form: 'Send the body as a form (Content-Type: application/x-www-form-urlencoded or multipart/form-data).',
  'json-or-form': 'Send the body as JSON (application/json) or as a form (application/x-www-form-urlencoded or multipart/form-data).',
}

function refuse(status: number, body: Record<string, unknown>): never {
  throw Response.json(body, { status })
}

// After a refusal made before the body was read, the rest is read and dropped (never kept), so the
// client, still sending, gets the answer: closing a socket with unread data resets the connection,
// and the reset can destroy the answer before the client reads it. Past these bounds the
// connection is cut instead.
const DISCARD_BYTES = 16 * MAX_BODY_BYTES
const DISCARD_MS = 10_000

function discardRest(reader: ReadableStreamDefaultReader<Uint8Array>) {
  const cut = () => void reader.cancel().catch(() => {})
  const timer = setTimeout(cut, DISCARD_MS)
  timer.unref()
  void (async () => {
    let dropped = 0
    try {
      for (;;) {
        const { done, value } = await reader.read()
        if (done) return
        dropped += value.byteLength
        if (dropped > DISCARD_BYTES) return cut()
      }
    } catch {
      // The client went away: nothing left to drop.
    } finally {
      clearTimeout(timer)
    }
  })()
}

/** Refuses a request whose body has not been read: the body is dropped in the background. */
function refuseUnread(request: Request, status: number, body: Record<string, unknown>): never {
  if (request.body && !request.bodyUsed && !request.body.locked) discardRest(request.body.getReader())
  refuse(status, body)
}

function mediaType(request: Request): string {
  return (request.headers.get('Content-Type') ?? '').split(';')[0].trim().toLowerCase()
}

const isJson = (type: string) => type === 'application/json' || /^application\/[\w.-]+\+json$/.test(type)
const isForm = (type: string) => type === 'application/x-www-form-urlencoded' || type === 'multipart/form-data'

function kindOf(request: Request, accepts: Accepts): 'json' | 'form' {
  const type = mediaType(request)
  if (accepts !== 'form' && isJson(type)) return 'json'
  if (accepts !== 'json' && isForm(type)) return 'form'
  refuseUnread(request, 415, { error: `${type ? `A ${type} body is not accepted here. ` : 'The request has no Content-Type. '}${WANTED[accepts]}` })
}

const TOO_LARGE = { error: `The request body is larger than ${MAX_BODY_BYTES / 1024 / 1024} MB; send less at a time.` }

/**
 * The body's bytes, refused with 413 as soon as they pass `limit`: a declared Content-Length is
 * checked before anything is read, and a chunked body is counted as it arrives, so an oversized body
 * is never held in memory.
 */
export async function readBytes(request: Request, limit = MAX_BODY_BYTES): Promise<Buffer> {
  const declared = request.headers.get('Content-Length')
  if (declared !== null && Number(declared) > limit) refuseUnread(request, 413, TOO_LARGE)
  if (!request.body) return Buffer.alloc(0)
  const reader = request.body.getReader()
  const chunks: Uint8Array[] = []
  let size = 0
  for (;;) {
    const { done, value } = await reader.read()
    if (done) break
    size += value.byteLength
    if (size > limit) {
      discardRest(reader)
      refuse(413, TOO_LARGE)
    }
    chunks.push(value)
  }
  return Buffer.concat(chunks)
}

function parseJson(bytes: Uint8Array): unknown {
  if (bytes.byteLength === 0) refuse(400, { error: 'The body is empty; send JSON.' })
  let text: string
  try {
    text = new TextDecoder('utf-8', { fatal: true }).decode(bytes)
  } catch {
    refuse(400, { error: 'The body is not valid UTF-8 text.' })
  }
  try {
    return JSON.parse(text)
  } catch (error) {
    refuse(400, { error: `The body is not valid JSON: ${(error as Error).message}` })
  }
}

async function parseForm(request: Request, bytes: Buffer): Promise<FormData> {
  try {
    // Re-wrapped so the form parser sees the checked bytes, not the original stream (copied into a
    // plain Uint8Array, which is what the fetch types accept as a body).
    return await new Response(new Uint8Array(bytes), { headers: { 'Content-Type': request.headers.get('Content-Type')! } }).formData()
  } catch {
    refuse(400, { error: 'The form data could not be read.' })
  }
}

/** A form as a plain object; a field sent more than once keeps its last value. */
export const formObject = (form: FormData): Record<string, unknown> => Object.fromEntries(form)

/** The form of a page action, checked for type (415) and size (413), for routes that validate it themselves. */
export async function readFormData(request: Request): Promise<FormData> {
  kindOf(request, 'form')
  return parseForm(request, await readBytes(request))
}

function validate<S extends z.ZodType>(schema: S, raw: unknown): z.infer<S> {
  const parsed = schema.safeParse(raw)
  if (!parsed.success) {
    refuse(400, { error: 'Invalid request', issues: parsed.error.issues.map((i) => ({ path: i.path.join('.'), message: i.message })) })
  }
  return parsed.data
}

/**
 * Reads and checks an action's body; throws the refusal as a JSON response: 415 for a body of
 * another type, 413 past `MAX_BODY_BYTES`, 400 for unreadable JSON or form data, and 400 with the
 * issues when the schema rejects it.
 */
export async function readJson<S extends z.ZodType>(request: Request, schema: S): Promise<z.infer<S>> {
  kindOf(request, 'json')
  return validate(schema, parseJson(await readBytes(request)))
}

/** As `readJson`, taking JSON or a form alike (pages post forms, scripts post JSON). */
export async function readJsonOrForm<S extends z.ZodType>(request: Request, schema: S, toObject = formObject): Promise<z.infer<S>> {
  const kind = kindOf(request, 'json-or-form')
  const bytes = await readBytes(request)
  return validate(schema, kind === 'json' ? parseJson(bytes) : toObject(await parseForm(request, bytes)))
}

/**
 * Answers a method the route does not serve: 405 with the methods it does serve (its declared
 * `handle.methods`), logged in one line like any other refused request.
 */
export function methodNotAllowed(request: Request, allow: readonly string[]): Response {
  const message = `Use ${allow.join(' or ')}.`
  console.warn(`${request.method} ${new URL(request.url).pathname} 405: ${message}`)
  return Response.json({ error: message }, { status: 405, headers: { Allow: allow.join(', ') } })
}

/**
 * A method a route has no handler for gets the framework's own 405, whose body says "Unexpected
 * Server Error": an API client is told instead, in the same shape as every other refusal, which
 * method the address does not take. (The framework already logs it as one line.)
 */
async function apiAnswer(request: Request, response: Response): Promise<Response> {
  const { pathname } = new URL(request.url)
  if (response.status !== 405 || !pathname.startsWith('/api/') || !response.headers.get('Content-Type')?.includes('application/json')) return response
  const body = (await response.clone().json().catch(() => null)) as Record<string, unknown> | null
  if (!body || body.error !== undefined) return response
  const headers = new Headers(response.headers)
  headers.delete('Content-Length')
  return Response.json({ error: `${pathname} does not take ${request.method}.` }, { status: 405, headers })
}

/**
 * Root middleware: every /api/* answer, refusals included, is never sniffed and never kept by a
 * browser or proxy (they carry one person's records). A route that chose its own caching (an
 * attachment's image) keeps it.
 */
export const apiHeaders: MiddlewareFunction<Response> = async ({ request }, next) => {
  const response = await apiAnswer(request, await next())
  if (!new URL(request.url).pathname.startsWith('/api/')) return response
  const headers = new Headers(response.headers)
  headers.set('X-Content-Type-Options', 'nosniff')
  if (!headers.has('Cache-Control')) headers.set('Cache-Control', 'no-store')
  return new Response(response.body, { status: response.status, statusText: response.statusText, headers })
}
