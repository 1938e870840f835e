import type { ColumnDef } from '@tanstack/react-table'
import { requireUser } from '~/.server/auth'
import { getDb } from '~/.server/db'
import { firstWindow } from '~/.server/list-answers'
import { technicianOptions } from '~/.server/lists/visits'
import { officeToday } from '~/.server/today'
import { pageSorts } from '~/.server/list-query'
import { siteList, siteQuery, type SiteListRow } from '~/.server/lists/sites'
import { countOf, linkCell, monoCell, selectColumn } from '~/components/columns'
import { ListPage } from '~/components/list-page'
import { StateBadge } from '~/components/state-badge'
import type { RouteAccess } from '~/domain/permissions'
import { formatCount } from '~/utils/format'
import type { Route } from './+types/_app.sites._index'

export const handle = { access: { loader: 'view:fleet' } satisfies RouteAccess }
export const meta: Route.MetaFunction = () => [{ title: 'Sites · Ductkeeper' }]

export async function loader({ request }: Route.LoaderArgs) {
  await requireUser(request, 'view:fleet')
  const db = getDb()
  // Counts per site sort only over a few thousand sites (a customer's): offered when the filters leave so few.
  const sortable = pageSorts(db, siteList, siteQuery, request, { today: officeToday() })
  return { first: await firstWindow(request, '/api/sites'), sortable, defaultSort: siteList.defaultSort, technicians: technicianOptions(db).filter((t) => t.active), today: officeToday() }
}

const delay = (s: number) => (s === 0 ? 'at once' : `${s / 60} min`)
const columns: ColumnDef<SiteListRow>[] = [
  selectColumn(),
  { id: 'name', header: 'Site', size: 2, minSize: 220, cell: linkCell((r) => `/sites/${r.id}`, (r) => r.name) },
  { id: 'customer', header: 'Customer', size: 1.3, minSize: 160, cell: ({ row }) => <span className="text-ink-soft">{row.original.customer}</span> },
  { accessorKey: 'street', header: 'Street', size: 1.3, minSize: 160 },
  { accessorKey: 'city', header: 'Town', size: 130 },
  { id: 'region', header: 'Region', size: 92, cell: monoCell((r) => r.region) },
  { id: 'codeBasis', header: 'Code', size: 90, cell: ({ row }) => (row.original.codeBasis === 'imc' ? 'IMC' : 'NFPA 90A') },
  { accessorKey: 'monitoring', header: 'Monitoring', size: 1.2, minSize: 160, cell: ({ row }) => row.original.monitoring ?? <span className="text-ink-faint">None on record</span> },
  { id: 'delayPolicySeconds', header: 'Delay policy', size: 124, cell: ({ row }) => delay(row.original.delayPolicySeconds) },
  { id: 'detectors', header: 'Detectors', size: 92, cell: monoCell((r) => r.detectors) },
  { id: 'overdue', header: 'Overdue', size: 84, cell: ({ row }) => <span className={`font-mono text-xs ${row.original.overdue ? 'text-late' : ''}`}>{row.original.overdue}</span> },
  { id: 'nextVisitOn', header: 'Next visit', size: 108, cell: monoCell((r) => r.nextVisitOn) },
]

export default function Sites({ loaderData }: Route.ComponentProps) {
  return (
    <ListPage<SiteListRow>
      first={loaderData.first}
      bulk={{ list: 'sites', technicians: loaderData.technicians, today: loaderData.today }}
      sortable={loaderData.sortable}
      defaultSort={loaderData.defaultSort}
      title="Sites"
      page="sites"
      endpoint="/api/sites"
      label="sites"
      placeholder="Name, street, town or postcode"
      filters={[{ param: 'codeBasis', label: 'Code basis', options: [{ value: 'imc', label: 'IMC' }, { value: 'nfpa90a', label: 'NFPA 90A' }] }]}
      columns={columns}
      rowHref={(r) => `/sites/${r.id}`}
      phone={(r) => ({
        title: r.name,
        badges: r.overdue > 0 && <StateBadge value="overdue" label={`${formatCount(r.overdue)} overdue`} />,
        lines: [`${r.customer} · ${r.city}`, `${countOf(r.units, 'unit')} · ${countOf(r.detectors, 'detector')} · next visit ${r.nextVisitOn ?? 'not booked'}`],
      })}
    />
  )
}
