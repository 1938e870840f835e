import { z } from 'zod'
import { requireUser } from '~/.server/auth'
import { getDb } from '~/.server/db'
import { readJsonOrForm } from '~/.server/http'
import { listAnswers } from '~/.server/list-answers'
import { idParam, isoDate } from '~/.server/list-query'
import { acknowledge, assign, BOOKING_KINDS, Refusal, scheduleVisits } from '~/.server/repos/triage-actions'
import { officeToday } from '~/.server/today'
import { can, type RouteAccess } from '~/domain/permissions'
import { siteBooking } from '~/domain/visit-forms'
import type { Route } from './+types/api.triage'

// Scheduling is the widest write here (office may do it); acknowledging and assigning are checked
// per intent below.
export const handle = { access: { loader: 'view:fleet', action: 'schedule:visits' } satisfies RouteAccess }

export async function loader({ request }: Route.LoaderArgs) {
  await requireUser(request, 'view:fleet')
  return Response.json(listAnswers['/api/triage'](getDb(), request))
}

const ids = z
  .array(idParam)
  .min(1, 'Select at least one detector')
  .max(500, 'At most 500 at a time')
  .transform((list) => [...new Set(list)])
const body = z.discriminatedUnion('intent', [
  z.object({ intent: z.literal('acknowledge'), ids, note: z.string().trim().max(500).optional() }),
  z.object({ intent: z.literal('assign'), ids, technicianId: idParam }),
  z
    .object({
      intent: z.literal('schedule'),
      ids,
      // The common day and technician; `sites` gives each site its own, as the booking form does.
      date: isoDate.optional(),
      kind: z.enum(BOOKING_KINDS).default('test'),
      technicianId: idParam.nullable().default(null),
      sites: z.array(siteBooking).max(500).optional(),
    })
    .refine((b) => b.date !== undefined || (b.sites?.length ?? 0) > 0, { path: ['date'], message: 'Pick a day for the visit' }),
])

/** A form post carries one `ids` field per detector. */
function formBody(form: FormData) {
  return { ...Object.fromEntries(form), ids: form.getAll('ids') }
}

export async function action({ request }: Route.ActionArgs) {
  const user = await requireUser(request, 'schedule:visits')
  const input = await readJsonOrForm(request, body, formBody)
  if (input.intent !== 'schedule' && !can(user.role, 'triage:fleet')) {
    return Response.json({ error: 'Your role does not allow this.' }, { status: 403 })
  }
  const db = getDb()
  try {
    switch (input.intent) {
      case 'acknowledge': {
        const n = acknowledge(db, user.id, input.ids, input.note ?? null)
        return Response.json({ ok: true, message: `Acknowledged ${n} detector${n === 1 ? '' : 's'}; they leave the open queue.` })
      }
      case 'assign': {
        const r = assign(db, user.id, input.ids, input.technicianId)
        return Response.json({ ok: true, message: `Assigned ${r.count} to ${r.technician}.` })
      }
      case 'schedule': {
        const r = scheduleVisits(db, user.id, input.ids, { date: input.date, kind: input.kind, technicianId: input.technicianId, sites: input.sites, today: officeToday() })
        const days = [...new Set(r.booked.map((b) => b.scheduledOn))].sort()
        const when = days.length === 1 ? `on ${days[0]}` : `from ${days[0]} to ${days[days.length - 1]}`
        return Response.json({
          ok: true,
          visits: r.booked,
          message: `Booked ${r.visits} visit${r.visits === 1 ? '' : 's'} ${when} for ${r.detectors} detector${r.detectors === 1 ? '' : 's'}. Notify each monitoring company before the work.`,
        })
      }
    }
  } catch (error) {
    if (error instanceof Refusal) return Response.json({ error: error.message, ...error.extra }, { status: error.status })
    throw error
  }
}
