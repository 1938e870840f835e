import { http, HttpResponse } from 'msw'
import { setupServer } from 'msw/node'

/** A message the fake provider accepted, as the Resend API received it. */
export interface CapturedEmail {
  id: string
  idempotencyKey: string | null
  from: string
  to: string[]
  subject: string
  html: string
  text: string
}

interface Fake {
  server: ReturnType<typeof setupServer>
  messages: CapturedEmail[]
  byKey: Map<string, string>
}

const globalFake = globalThis as unknown as { __ductkeeperResendFake?: Fake }

/** The API origin the SDK calls; RESEND_BASE_URL moves it, as the SDK itself honours that variable. */
export function resendApiBase(): string {
  return (process.env.RESEND_BASE_URL || 'https://api.resend.com').replace(/\/$/, '')
}

const LOOPBACK = new Set(['127.0.0.1', 'localhost', '::1', '[::1]'])

function handlers(fake: Omit<Fake, 'server'>) {
  return [
    http.post(`${resendApiBase()}/emails`, async ({ request }) => {
      const body = (await request.json()) as { from?: string; to?: string | string[]; subject?: string; html?: string; text?: string }
      if (!body.from || !body.to || !body.subject) {
        return HttpResponse.json({ statusCode: 422, name: 'validation_error', message: 'from, to and subject are required' }, { status: 422 })
      }
      const key = request.headers.get('idempotency-key')
      // The real service answers a repeated key with the first message's id and sends nothing new.
      const earlier = key ? fake.byKey.get(key) : undefined
      if (earlier) return HttpResponse.json({ id: earlier })
      const id = `fake-${crypto.randomUUID()}`
      if (key) fake.byKey.set(key, id)
      fake.messages.push({
        id,
        idempotencyKey: key,
        from: body.from,
        to: Array.isArray(body.to) ? body.to : [body.to],
        subject: body.subject,
        html: body.html ?? '',
        text: body.text ?? '',
      })
      return HttpResponse.json({ id })
    }),
  ]
}

/**
 * Starts the fake provider once per process. Requests to loopback (the local identity provider, the
 * app's own test servers) pass through; any other request that no handler answers fails, so nothing
 * leaves the machine.
 */
export function startResendFake(): Fake {
  if (globalFake.__ductkeeperResendFake) return globalFake.__ductkeeperResendFake
  const state = { messages: [] as CapturedEmail[], byKey: new Map<string, string>() }
  const server = setupServer(...handlers(state))
  server.listen({
    onUnhandledRequest(request, print) {
      if (LOOPBACK.has(new URL(request.url).hostname)) return
      print.error()
    },
  })
  const fake: Fake = { server, ...state }
  globalFake.__ductkeeperResendFake = fake
  return fake
}
