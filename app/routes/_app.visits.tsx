import type { ColumnDef } from '@tanstack/react-table'
import { requireUser } from '~/.server/auth'
import type { VisitListRow } from '~/.server/lists/visits'
import { badgeCell, linkCell, monoCell, selectColumn } from '~/components/columns'
import { ListPage, options } from '~/components/list-page'
import { StateBadge } from '~/components/state-badge'
import type { RouteAccess } from '~/domain/permissions'
import type { Route } from './+types/_app.visits'

export const handle = { access: { loader: 'view:fleet' } satisfies RouteAccess }
export const meta: Route.MetaFunction = () => [{ title: 'Visits · Ductkeeper' }]

export async function loader({ request }: Route.LoaderArgs) {
  await requireUser(request, 'view:fleet')
  return null
}

const columns: ColumnDef<VisitListRow>[] = [
  selectColumn(),
  { id: 'scheduledOn', header: 'Date', size: 108, cell: monoCell((r) => r.scheduledOn) },
  { id: 'kind', header: 'Work', size: 120, cell: ({ row }) => <span className="capitalize">{row.original.kind}</span> },
  { id: 'status', header: 'Status', size: 120, cell: badgeCell((r) => r.status) },
  { id: 'notified', header: 'Monitoring told', size: 130, cell: ({ row }) => <StateBadge value={row.original.notified ? 'pass' : 'unknown'} label={row.original.notified ? 'Notified' : 'Not yet'} /> },
  { id: 'site', header: 'Site', size: 2, minSize: 220, cell: linkCell((r) => `/sites/${r.siteId}`, (r) => r.site) },
  { id: 'city', header: 'Town', size: 130 },
  { id: 'customer', header: 'Customer', size: 1.2, minSize: 160, cell: ({ row }) => <span className="text-ink-soft">{row.original.customer}</span> },
  { id: 'technician', header: 'Technician', size: 150, cell: ({ row }) => row.original.technician ?? <span className="text-late">Not assigned</span> },
  { id: 'detectors', header: 'Detectors', size: 92, cell: monoCell((r) => r.detectors) },
]

export default function Visits() {
  return (
    <ListPage<VisitListRow>
      title="Visits"
      page="visits"
      endpoint="/api/visits"
      label="visits"
      placeholder="Site, street or town"
      filters={[
        { param: 'status', label: 'Status', options: options(['planned', 'notified', 'in-progress', 'done', 'cancelled']) },
        { param: 'kind', label: 'Work', options: options(['inspection', 'test', 'cleaning', 'repair', 'commissioning']) },
      ]}
      columns={columns}
      rowHref={(r) => `/sites/${r.siteId}`}
    />
  )
}
