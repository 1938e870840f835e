import type { ColumnDef } from '@tanstack/react-table'
import { requireUser } from '~/.server/auth'
import { getDb } from '~/.server/db'
import { firstWindow } from '~/.server/list-answers'
import { technicianOptions } from '~/.server/lists/visits'
import { officeToday } from '~/.server/today'
import { customerList, type CustomerListRow } from '~/.server/lists/customers'
import { countOf, linkCell, monoCell, selectColumn } from '~/components/columns'
import { ListPage, options, sentence } from '~/components/list-page'
import { StateBadge } from '~/components/state-badge'
import { formatCount } from '~/utils/format'
import type { RouteAccess } from '~/domain/permissions'
import type { Route } from './+types/_app.customers._index'

export const handle = { access: { loader: 'view:fleet' } satisfies RouteAccess }
export const meta: Route.MetaFunction = () => [{ title: 'Customers · Ductkeeper' }]

export async function loader({ request }: Route.LoaderArgs) {
  await requireUser(request, 'view:fleet')
  return { first: await firstWindow(request, '/api/customers'), sortable: Object.keys(customerList.sorts), defaultSort: customerList.defaultSort, technicians: technicianOptions(getDb()).filter((t) => t.active), today: officeToday() }
}

const columns: ColumnDef<CustomerListRow>[] = [
  selectColumn(),
  { id: 'name', header: 'Customer', size: 2, minSize: 240, cell: linkCell((r) => `/customers/${r.id}`, (r) => r.name) },
  { id: 'kind', header: 'Kind', size: 120, cell: ({ row }) => <span className="capitalize">{row.original.kind}</span> },
  { id: 'sites', header: 'Sites', size: 90, cell: monoCell((r) => r.sites) },
  { id: 'detectors', header: 'Detectors', size: 100, cell: monoCell((r) => r.detectors) },
  { id: 'overdue', header: 'Overdue', size: 100, cell: ({ row }) => <span className={`font-mono text-xs ${row.original.overdue ? 'text-late' : ''}`}>{row.original.overdue}</span> },
  { id: 'inTrouble', header: 'In trouble', size: 100, cell: ({ row }) => <span className={`font-mono text-xs ${row.original.inTrouble ? 'text-trouble' : ''}`}>{row.original.inTrouble}</span> },
]

export default function Customers({ loaderData }: Route.ComponentProps) {
  return (
    <ListPage<CustomerListRow>
      first={loaderData.first}
      bulk={{ list: 'customers', technicians: loaderData.technicians, today: loaderData.today }}
      sortable={loaderData.sortable}
      defaultSort={loaderData.defaultSort}
      title="Customers"
      page="customers"
      endpoint="/api/customers"
      label="customers"
      placeholder="Customer name"
      filters={[{ param: 'kind', label: 'Kind', options: options(['restaurant', 'retail', 'office', 'school', 'healthcare']) }]}
      columns={columns}
      rowHref={(r) => `/customers/${r.id}`}
      phone={(r) => ({
        title: r.name,
        badges: (
          <>
            {r.overdue > 0 && <StateBadge value="overdue" label={`${formatCount(r.overdue)} overdue`} />}
            {r.inTrouble > 0 && <StateBadge value="trouble" label={`${formatCount(r.inTrouble)} in trouble`} />}
          </>
        ),
        lines: [sentence(r.kind), `${countOf(r.sites, 'site')} · ${countOf(r.detectors, 'detector')}`],
      })}
    />
  )
}
