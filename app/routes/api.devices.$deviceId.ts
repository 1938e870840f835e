import { requireUser } from '~/.server/auth'
import { getDb } from '~/.server/db'
import { deviceReport } from '~/.server/device-report'
import { notFound, recordId } from '~/.server/repos/record-id'
import { officeToday } from '~/.server/today'
import type { RouteAccess } from '~/domain/permissions'
import type { Route } from './+types/api.devices.$deviceId'

export const handle = { access: { loader: 'view:fleet' } satisfies RouteAccess }

/** The device page's data as JSON: the stored record and the trade engine's findings on it. */
export async function loader({ request, params }: Route.LoaderArgs) {
  await requireUser(request, 'view:fleet')
  const report = deviceReport(getDb(), recordId(params, 'deviceId'), officeToday())
  return report ? Response.json(report) : notFound('detector')
}
