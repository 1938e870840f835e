import { requireUser } from '~/.server/auth'
import { getDb } from '~/.server/db'
import { readJsonOrForm } from '~/.server/http'
import { notFound, recordId } from '~/.server/repos/record-id'
import { visitRecord } from '~/.server/repos/visit'
import { officeToday } from '~/.server/today'
import { payloadOf, refusalResponse } from '~/.server/visits/refusal'
import { applyEmailIntent, isEmailIntent } from '~/.server/visits/notice-email'
import { applyVisitIntent } from '~/.server/visits/work'
import type { RouteAccess } from '~/domain/permissions'
import { visitIntent } from '~/domain/visit-forms'
import type { Route } from './+types/api.visits.$visitId'

// Recording work is the widest write (technicians, on their own visits); each intent is checked
// again against the visit and the role in the workflow.
export const handle = { access: { loader: 'view:fleet', action: 'record:work' } satisfies RouteAccess }

export async function loader({ request, params }: Route.LoaderArgs) {
  await requireUser(request, 'view:fleet')
  const record = visitRecord(getDb(), recordId(params, 'visitId'))
  return record ? Response.json(record) : notFound('visit')
}

export async function action({ request, params }: Route.ActionArgs) {
  const user = await requireUser(request, 'record:work')
  const visitId = recordId(params, 'visitId')
  const input = await readJsonOrForm(request, visitIntent, (form) => payloadOf(form) as Record<string, unknown>)
  const db = getDb()
  try {
    if (isEmailIntent(input)) {
      // A message the provider refused is not a refused request: it is logged and shown as failed, to retry.
      const email = await applyEmailIntent(db, user, visitId, input, { today: officeToday() })
      return Response.json({ ...visitRecord(db, visitId), email })
    }
    applyVisitIntent(db, user, visitId, input, { today: officeToday() })
  } catch (error) {
    return refusalResponse(error)
  }
  return Response.json(visitRecord(db, visitId))
}
