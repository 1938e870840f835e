/** A visit write refused for a reason the caller can act on; the route answers with its status. */
export class VisitRefusal extends Error {
  constructor(
    readonly status: 400 | 403 | 404 | 409,
    message: string,
    readonly extra: Record<string, unknown> = {},
  ) {
    super(message)
  }
}

export function refusalResponse(error: unknown): Response {
  if (error instanceof VisitRefusal) return Response.json({ error: error.message, ...error.extra }, { status: error.status })
  throw error
}

/**
 * Progressive forms post the action's JSON in one `payload` field, so the same checks apply to a
 * form and to a script. An unreadable payload is a 400, never a 500.
 */
export function payloadOf(form: FormData): unknown {
  const payload = form.get('payload')
  if (typeof payload !== 'string') throw Response.json({ error: 'Send JSON, or a form with a payload field holding JSON.' }, { status: 400 })
  try {
    return JSON.parse(payload) as unknown
  } catch {
    throw Response.json({ error: 'The payload field is not readable JSON.' }, { status: 400 })
  }
}

