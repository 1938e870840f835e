import type { ColumnDef } from '@tanstack/react-table'
import { Link } from 'react-router'
import { requireUser } from '~/.server/auth'
import { getDb } from '~/.server/db'
import { firstWindow } from '~/.server/list-answers'
import { technicianOptions } from '~/.server/lists/visits'
import { officeToday } from '~/.server/today'
import { eventList, eventQuery, type EventListRow } from '~/.server/lists/events'
import { linkCell, monoCell, selectColumn } from '~/components/columns'
import { KeyHint, ListPage, options, sentence } from '~/components/list-page'
import type { RouteAccess } from '~/domain/permissions'
import { siteDateTime } from '~/utils/time-format'
import type { Route } from './+types/_app.events'

export const handle = { access: { loader: 'view:fleet' } satisfies RouteAccess }
export const meta: Route.MetaFunction = () => [{ title: 'Events · Ductkeeper' }]

export async function loader({ request }: Route.LoaderArgs) {
  await requireUser(request, 'view:fleet')
  // The headers offer exactly the orders the list route accepts with the current filters: across
  // all events only time, within one site or detector every column.
  const url = new URL(request.url)
  const within = { site: url.searchParams.get('site') ?? undefined, detector: url.searchParams.get('detector') ?? undefined }
  const sortable = Object.keys(eventList.sorts).filter((sort) => eventQuery.safeParse({ ...within, sort }).success)
  return { first: await firstWindow(request, '/api/events'), sortable, defaultSort: eventList.defaultSort, technicians: technicianOptions(getDb()).filter((t) => t.active), today: officeToday() }
}

const KINDS = ['alarm', 'trouble', 'supervisory', 'restore', 'test', 'reset', 'cleaning', 'notice', 'change'] as const
const GLYPH: Record<string, string> = { alarm: '◆', trouble: '▲', supervisory: '◆', restore: '✓', test: '⚑', reset: '↺', cleaning: '✧', notice: '☎', change: '✎' }

// On the site's clock with its zone, as the record pages show an event; a row without a site's
// zone says UTC rather than pass the office's clock off as the site's.
const when = (r: EventListRow) => siteDateTime(r.occurredAt, r.timeZone ?? 'UTC')

const columns: ColumnDef<EventListRow>[] = [
  selectColumn(),
  { id: 'occurredAt', header: 'When', size: 190, cell: monoCell(when) },
  {
    id: 'kind',
    header: 'Kind',
    size: 130,
    cell: ({ row }) => (
      <span className="capitalize">
        <span aria-hidden="true" className="mr-1.5 font-mono text-ink-faint">
          {GLYPH[row.original.kind] ?? '·'}
        </span>
        {row.original.kind}
      </span>
    ),
  },
  { id: 'detail', header: 'Detail', size: 2, minSize: 220, cell: ({ row }) => row.original.detail ?? <span className="text-ink-faint">—</span> },
  { id: 'detector', header: 'Detector', size: 110, cell: ({ row }) =>
      row.original.detectorId ? (
        <Link to={`/devices/${row.original.detectorId}`} className="font-mono hover:underline" tabIndex={-1}>
          {row.original.detectorTag}
        </Link>
      ) : (
        <span className="text-ink-faint">site</span>
      ),
  },
  { id: 'site', header: 'Site', size: 2, minSize: 200, cell: linkCell((r) => `/sites/${r.siteId}`, (r) => r.site) },
  { id: 'by', header: 'By', size: 140, cell: ({ row }) => row.original.by ?? <span className="text-ink-faint">panel</span> },
]

export default function Events({ loaderData }: Route.ComponentProps) {
  return (
    <ListPage<EventListRow>
      first={loaderData.first}
      bulk={{ list: 'events', technicians: loaderData.technicians, today: loaderData.today }}
      sortable={loaderData.sortable}
      defaultSort={loaderData.defaultSort}
      title="Events"
      page="events"
      endpoint="/api/events"
      label="events"
      placeholder="Detector tag, site, street or town"
      filters={[{ param: 'kind', label: 'Kind', options: options(KINDS) }]}
      columns={columns}
      rowHref={(r) => (r.detectorId ? `/devices/${r.detectorId}` : `/sites/${r.siteId}`)}
      note={
        <>
          Newest first<KeyHint> · j/k to move · Enter opens the detector</KeyHint>
        </>
      }
      phone={(r) => ({
        title: (
          <>
            <span aria-hidden="true" className="mr-1.5 font-mono text-ink-faint">
              {GLYPH[r.kind] ?? '·'}
            </span>
            {sentence(r.kind)}
          </>
        ),
        badges: <span className="font-mono text-xs text-ink-soft">{when(r)}</span>,
        lines: [`${r.detectorTag ?? 'Whole site'} · ${r.site}`, r.detail ?? (r.by ? `By ${r.by}` : 'From the panel')],
      })}
    />
  )
}
