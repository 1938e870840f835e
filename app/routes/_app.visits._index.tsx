import type { ColumnDef } from '@tanstack/react-table'
import { redirect } from 'react-router'
import { requireUser } from '~/.server/auth'
import { getDb } from '~/.server/db'
import { firstWindow } from '~/.server/list-answers'
import { pageSorts } from '~/.server/list-query'
import { technicianOptions, visitList, visitQuery, type VisitListRow } from '~/.server/lists/visits'
import { officeToday } from '~/.server/today'
import { badgeCell, countOf, linkCell, monoCell, selectColumn } from '~/components/columns'
import { ListPage, options, sentence } from '~/components/list-page'
import { StateBadge } from '~/components/state-badge'
import type { RouteAccess } from '~/domain/permissions'
import type { Route } from './+types/_app.visits._index'

// Bare /visits redirects to today's work; sampleQuery reaches the page itself in the route × role test.
export const handle = { access: { loader: 'view:fleet' } satisfies RouteAccess, sampleQuery: 'status=planned' }
export const meta: Route.MetaFunction = () => [{ title: 'Visits · Ductkeeper' }]

export async function loader({ request }: Route.LoaderArgs) {
  await requireUser(request, 'view:fleet')
  // Opened bare (the rail, `g v`), the list starts at the office's today, soonest first. The choice
  // is written into the URL so the filter bar shows it and can clear it; any query string at all
  // (a saved view, a cleared filter that kept its sort) is left as it is.
  const url = new URL(request.url)
  if (url.search === '') {
    throw redirect(`/visits?${new URLSearchParams({ from: officeToday(), sort: 'scheduledOn', dir: 'asc' })}`)
  }
  const db = getDb()
  // Technician and the counts sort only over a few thousand visits (a period's, a site's): offered when the filters leave so few.
  const sortable = pageSorts(db, visitList, visitQuery, request)
  return { first: await firstWindow(request, '/api/visits'), technicians: technicianOptions(db), today: officeToday(), sortable, defaultSort: visitList.defaultSort }
}

const columns: ColumnDef<VisitListRow>[] = [
  selectColumn(),
  { id: 'scheduledOn', header: 'Date', size: 108, cell: monoCell((r) => r.scheduledOn) },
  { id: 'kind', header: 'Work', size: 120, cell: ({ row }) => <span className="capitalize">{row.original.kind}</span> },
  { id: 'status', header: 'Status', size: 120, cell: badgeCell((r) => r.status) },
  { id: 'notified', header: 'Monitoring told', size: 150, cell: ({ row }) => <StateBadge value={row.original.notified ? 'pass' : 'unknown'} label={row.original.notified ? 'Notified' : 'Not yet'} /> },
  { id: 'site', header: 'Site', size: 2, minSize: 220, cell: linkCell((r) => `/sites/${r.siteId}`, (r) => r.site) },
  { accessorKey: 'city', header: 'Town', size: 130 },
  { id: 'customer', header: 'Customer', size: 1.2, minSize: 160, cell: ({ row }) => <span className="text-ink-soft">{row.original.customer}</span> },
  { id: 'technician', header: 'Technician', size: 150, cell: ({ row }) => row.original.technician ?? <span className="text-late">Not assigned</span> },
  { id: 'detectors', header: 'Detectors', size: 92, cell: monoCell((r) => r.detectors) },
]

export default function Visits({ loaderData }: Route.ComponentProps) {
  const { technicians } = loaderData
  return (
    <ListPage<VisitListRow>
      first={loaderData.first}
      bulk={{ list: 'visits', technicians: technicians.filter((t) => t.active), today: loaderData.today }}
      sortable={loaderData.sortable}
      defaultSort={loaderData.defaultSort}
      title="Visits"
      page="visits"
      endpoint="/api/visits"
      label="visits"
      placeholder="Site, street or town"
      filters={[
        { param: 'status', label: 'Status', options: options(['planned', 'notified', 'in-progress', 'done', 'cancelled']) },
        { param: 'kind', label: 'Work', options: options(['inspection', 'test', 'cleaning', 'repair', 'commissioning']) },
        {
          param: 'technician',
          label: 'Technician',
          options: technicians.map((t) => ({ value: String(t.id), label: t.active ? t.name : `${t.name} (left)` })),
        },
        { kind: 'date', param: 'from', label: 'From' },
        { kind: 'date', param: 'to', label: 'To' },
      ]}
      columns={columns}
      rowHref={(r) => `/visits/${r.id}`}
      phone={(r) => ({
        title: (
          <>
            <span className="font-mono">{r.scheduledOn}</span> · {sentence(r.kind)}
          </>
        ),
        badges: <StateBadge value={r.status} />,
        lines: [
          `${r.site} · ${r.city}`,
          <>
            {r.technician ?? <span className="text-late">Not assigned</span>} · {countOf(r.detectors, 'detector')} · {r.notified ? 'monitoring told' : 'not yet told'}
          </>,
        ],
      })}
    />
  )
}
