import { requireUser } from '~/.server/auth'
import { getDb } from '~/.server/db'
import { readJsonOrForm } from '~/.server/http'
import { listAnswers } from '~/.server/list-answers'
import { officeToday } from '~/.server/today'
import { bookVisit } from '~/.server/visits/book'
import { payloadOf, refusalResponse } from '~/.server/visits/refusal'
import type { RouteAccess } from '~/domain/permissions'
import { newVisit } from '~/domain/visit-forms'
import type { Route } from './+types/api.visits'

export const handle = { access: { loader: 'view:fleet', action: 'schedule:visits' } satisfies RouteAccess }

export async function loader({ request }: Route.LoaderArgs) {
  await requireUser(request, 'view:fleet')
  return Response.json(listAnswers['/api/visits'](getDb(), request))
}

/** Books a visit: 201 with its id, or 409 listing the open visits that already cover those tasks. */
export async function action({ request }: Route.ActionArgs) {
  const user = await requireUser(request, 'schedule:visits')
  const input = await readJsonOrForm(request, newVisit, (form) => payloadOf(form) as Record<string, unknown>)
  try {
    return Response.json(bookVisit(getDb(), user.id, input, officeToday()), { status: 201 })
  } catch (error) {
    return refusalResponse(error)
  }
}
