import { z } from 'zod'
import { requireUser } from '~/.server/auth'
import { getDb } from '~/.server/db'
import { idParam, parseQuery } from '~/.server/list-query'
import { BOOKING_KINDS, Refusal } from '~/.server/repos/triage-actions'
import { bookingPlan } from '~/.server/repos/triage-booking'
import { officeToday } from '~/.server/today'
import type { RouteAccess } from '~/domain/permissions'
import type { Route } from './+types/api.triage.booking'

// What booking the selection would make, read before the lead books: the suggestions and the open
// visits. sampleQuery: what the route × role test sends to reach the loader with valid input.
export const handle = { access: { loader: 'schedule:visits' } satisfies RouteAccess, sampleQuery: 'ids=1' }

const query = z.object({
  ids: z.preprocess(
    (v) => (Array.isArray(v) ? v : [v]).flatMap((s) => String(s ?? '').split(',')).filter(Boolean),
    z
      .array(idParam)
      .min(1, 'Select at least one detector')
      .max(500, 'At most 500 at a time')
      .transform((list) => [...new Set(list)]),
  ),
  kind: z.enum(BOOKING_KINDS).default('test'),
})

export async function loader({ request }: Route.LoaderArgs) {
  await requireUser(request, 'schedule:visits')
  const q = parseQuery(query, request)
  try {
    return Response.json(bookingPlan(getDb(), q.ids, q.kind, officeToday()))
  } catch (error) {
    if (error instanceof Refusal) return Response.json({ error: error.message, ...error.extra }, { status: error.status })
    throw error
  }
}
