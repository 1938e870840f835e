import type { ColumnDef } from '@tanstack/react-table'
import { requireUser } from '~/.server/auth'
import { getDb } from '~/.server/db'
import { firstWindow } from '~/.server/list-answers'
import { technicianOptions } from '~/.server/lists/visits'
import { officeToday } from '~/.server/today'
import { badgeCell, linkCell, monoCell, selectColumn } from '~/components/columns'
import type { FilterOption } from '~/components/filter-bar'
import { ListPage, options } from '~/components/list-page'
import { StateBadge } from '~/components/state-badge'
import { deviceList, type DeviceListRow } from '~/.server/lists/devices'
import type { RouteAccess } from '~/domain/permissions'
import type { Route } from './+types/_app.devices._index'

export const handle = { access: { loader: 'view:fleet' } satisfies RouteAccess }

export const meta: Route.MetaFunction = () => [{ title: 'Detectors · Ductkeeper' }]

export async function loader({ request }: Route.LoaderArgs) {
  await requireUser(request, 'view:fleet')
  return { first: await firstWindow(request, '/api/devices'), sortable: Object.keys(deviceList.sorts), defaultSort: deviceList.defaultSort, technicians: technicianOptions(getDb()).filter((t) => t.active), today: officeToday() }
}

const FILTERS: FilterOption[] = [
  { param: 'state', label: 'State', options: options(['normal', 'trouble', 'alarm', 'supervisory', 'out-of-service']) },
  { param: 'due', label: 'Due', options: [{ value: 'overdue', label: 'Overdue' }, { value: 'due', label: 'Due, inside the window' }, { value: 'due-soon', label: 'Due within 30 days' }, { value: 'ok', label: 'Up to date' }] },
  { param: 'environment', label: 'Location', options: options(['clean', 'dusty', 'kitchen', 'humid']) },
  { param: 'housing', label: 'Housing', options: [{ value: 'standard', label: 'Standard' }, { value: 'nema4', label: 'NEMA 4' }, { value: 'nema4x', label: 'NEMA 4X' }] },
  { param: 'delay', label: 'Delay vs policy', options: [{ value: 'agree', label: 'Agrees' }, { value: 'disagree', label: 'Disagrees' }, { value: 'unknown', label: 'Not recorded' }] },
  { param: 'loop', label: 'Loop', options: [{ value: 'fail', label: 'Fault found' }, { value: 'incomplete', label: 'Incomplete' }, { value: 'pass', label: 'Pass' }] },
]

const columns: ColumnDef<DeviceListRow>[] = [
  selectColumn(),
  { id: 'tag', header: 'Tag', size: 104, cell: linkCell((r) => `/devices/${r.id}`, (r) => r.tag, true) },
  { id: 'site', header: 'Site', size: 2, minSize: 200, cell: linkCell((r) => `/sites/${r.siteId}`, (r) => r.site) },
  { id: 'customer', header: 'Customer', size: 1.2, minSize: 150, cell: ({ row }) => <span className="text-ink-soft">{row.original.customer}</span> },
  { id: 'position', header: 'Duct', size: 76, cell: ({ row }) => <span className="capitalize">{row.original.position}</span> },
  { id: 'state', header: 'State', size: 132, cell: badgeCell((r) => r.state) },
  { id: 'due', header: 'Due', size: 116, cell: badgeCell((r) => r.due) },
  { id: 'nextDueOn', header: 'Next due', size: 108, cell: monoCell((r) => r.nextDueOn) },
  { id: 'environment', header: 'Location', size: 96, cell: ({ row }) => <span className="capitalize">{row.original.environment}</span> },
  { id: 'delay', header: 'Delay', size: 132, cell: badgeCell((r) => r.delay) },
  { id: 'loop', header: 'Loop', size: 112, cell: badgeCell((r) => r.loop) },
  { id: 'risk', header: 'Risk', size: 76, cell: monoCell((r) => r.risk) },
  { id: 'lastFunctionalOn', header: 'Last test', size: 108, cell: monoCell((r) => r.lastFunctionalOn) },
]

export default function Devices({ loaderData }: Route.ComponentProps) {
  return (
    <ListPage<DeviceListRow>
      first={loaderData.first}
      bulk={{ list: 'detectors', technicians: loaderData.technicians, today: loaderData.today }}
      sortable={loaderData.sortable}
      defaultSort={loaderData.defaultSort}
      title="Detectors"
      page="devices"
      endpoint="/api/devices"
      label="detectors"
      placeholder="Tag, serial, site, street or town"
      filters={FILTERS}
      columns={columns}
      rowHref={(r) => `/devices/${r.id}`}
      phone={(r) => ({
        title: <span className="font-mono">{r.tag}</span>,
        badges: (
          <>
            <StateBadge value={r.state} />
            {r.due && <StateBadge value={r.due} />}
          </>
        ),
        lines: [`${r.site} · ${r.city}`, `Next due ${r.nextDueOn ?? 'not set'} · ${r.customer}`],
      })}
    />
  )
}
