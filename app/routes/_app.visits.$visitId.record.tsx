import { Breadcrumb } from '~/components/breadcrumb'
import { requireUser } from '~/.server/auth'
import { getDb } from '~/.server/db'
import { visitInspectionRecord } from '~/.server/repos/inspection-record'
import { pageNotFound, pageRecordId } from '~/.server/repos/record-id'
import { VisitRecordSheet } from '~/components/inspection-record'
import { PrintButton } from '~/components/print-button'
import type { RouteAccess } from '~/domain/permissions'
import { formatDay } from '~/utils/format'
import type { Route } from './+types/_app.visits.$visitId.record'
import '~/print.css'

export const handle = { access: { loader: 'view:fleet' } satisfies RouteAccess }

export const meta: Route.MetaFunction = ({ data }) => [
  { title: data ? `Record · ${data.site.name} · ${formatDay(data.visit.scheduledOn)} · Ductkeeper` : 'Inspection record · Ductkeeper' },
]

export async function loader({ request, params }: Route.LoaderArgs) {
  await requireUser(request, 'view:fleet')
  const record = visitInspectionRecord(getDb(), pageRecordId(params, 'visitId', 'visit'))
  if (!record) throw pageNotFound('visit')
  return record
}

export default function VisitRecord({ loaderData }: Route.ComponentProps) {
  const { site, company, visit } = loaderData
  return (
    <div className="print-root mx-auto max-w-5xl">
      <div className="no-print mb-4 flex flex-wrap items-center justify-between gap-3">
        <Breadcrumb items={[{ to: `/sites/${site.id}`, name: site.name }]} here={`Inspection record of ${formatDay(visit.scheduledOn)}`} />
        <PrintButton />
      </div>
      <VisitRecordSheet site={site} company={company} visit={visit} />
    </div>
  )
}
