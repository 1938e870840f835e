import type { ColumnDef, RowSelectionState } from '@tanstack/react-table'
import { useMemo, useState } from 'react'
import { Link, useSearchParams } from 'react-router'
import { useSWRConfig } from 'swr'
import { requireUser } from '~/.server/auth'
import { getDb } from '~/.server/db'
import { firstWindow } from '~/.server/list-answers'
import { deviceList } from '~/.server/lists/devices'
import { triageQuery, type TriageRow } from '~/.server/lists/triage'
import { badgeCell, linkCell, monoCell, selectColumn, wrapCell } from '~/components/columns'
import { usePaletteActions } from '~/components/command-palette'
import { DataTable } from '~/components/data-table'
import { ExportButton } from '~/components/export-button'
import { FilterBar } from '~/components/filter-bar'
import { LoadError } from '~/components/load-error'
import { SavedViews } from '~/components/saved-views'
import { StateBadge } from '~/components/state-badge'
import { BookDialog, type Booked } from '~/components/triage/book-dialog'
import { Reasons } from '~/components/triage/reasons'
import { useJson } from '~/components/use-json'
import { buttonClass, inputClass, Notice, PageHeader, quietButtonClass } from '~/components/ui/page-header'
import { can, type RouteAccess } from '~/domain/permissions'
import { FetchError, fetchJson } from '~/utils/fetch-json'
import { formatCount } from '~/utils/format'
import { listQuery, readWindow } from '~/utils/list-window'
import type { Route } from './+types/_app.triage'

export const handle = { access: { loader: 'view:fleet' } satisfies RouteAccess }

export const meta: Route.MetaFunction = () => [{ title: 'Triage · Ductkeeper' }]

export async function loader({ request }: Route.LoaderArgs) {
  const user = await requireUser(request, 'view:fleet')
  const technicians = getDb().$client.prepare("select id, name from users where role = 'technician' and active = 1 order by name").all() as Array<{ id: number; name: string }>
  return {
    first: await firstWindow(request, '/api/triage'),
    technicians,
    canTriage: can(user.role, 'triage:fleet'),
    canSchedule: can(user.role, 'schedule:visits'),
    // The queue is the detectors list narrowed: it sorts as that list does, worst risk first.
    sortable: triageQuery.shape.sort.unwrap().options as string[],
    defaultSort: deviceList.defaultSort,
  }
}

// The queue refreshes itself this often while the tab is visible, marked as background so that a
// screen left open does not keep its session alive.
const REFRESH_MS = 20_000

const REASON_LABELS: Record<string, string> = {
  'in-trouble': 'In trouble',
  'in-alarm': 'Alarm or supervisory',
  'out-of-service': 'Out of service',
  overdue: 'Overdue',
  'failed-test': 'Failed last test',
  'failed-diagnosis': 'Wiring fault in readings',
  'repeated-troubles': 'Repeated troubles',
  'humid-unrated': 'Humid, unrated housing',
  'delay-disagrees': 'Delay differs from policy',
  'delay-unknown': 'Delay not recorded',
  'supervision-unproven': 'Supervision unproven',
}

const columns: ColumnDef<TriageRow>[] = [
  selectColumn(),
  { id: 'risk', header: 'Risk', size: 76, cell: monoCell((r) => r.risk) },
  { id: 'tag', header: 'Tag', size: 96, cell: linkCell((r) => `/devices/${r.id}`, (r) => r.tag, true) },
  {
    id: 'reasons',
    header: 'Why',
    size: 5,
    minSize: 280,
    enableSorting: false,
    cell: ({ row }) => <Reasons reasons={row.original.reasons} followUp={row.original.followUp} />,
  },
  // Wide enough that the longest site names take two lines; rows grow to fit (wrapRows), so a long
  // name wraps rather than being cut.
  { id: 'site', header: 'Site', size: 2, minSize: 250, cell: wrapCell(linkCell((r) => `/sites/${r.siteId}`, (r) => r.site)) },
  { id: 'state', header: 'State', size: 124, cell: badgeCell((r) => r.state) },
  { id: 'due', header: 'Due', size: 108, cell: badgeCell((r) => r.due) },
  // Narrow, so the width goes to the site: most rows have no one yet, and a long name takes two lines.
  { id: 'assignee', header: 'Assigned', size: 104, enableSorting: false, cell: wrapCell(({ row }) => row.original.assignee ?? <span className="text-ink-faint">—</span>) },
]

interface Answer {
  counts: Record<string, number> & { open: number }
}

export default function Triage({ loaderData }: Route.ComponentProps) {
  const { technicians, canTriage, canSchedule, sortable, defaultSort, first } = loaderData
  const [params, setParams] = useSearchParams()
  const query = useMemo(() => listQuery(params), [params])
  const [selection, setSelection] = useState<RowSelectionState>({})
  const [technician, setTechnician] = useState<string>(String(technicians[0]?.id ?? ''))
  const [booking, setBooking] = useState(false)
  const [notice, setNotice] = useState<{ tone: 'ok' | 'error'; text: string; visitId?: number } | null>(null)
  const [busy, setBusy] = useState(false)
  const { mutate } = useSWRConfig()
  // The counts ride along with any window of the queue; this one asks for the smallest.
  // The page's own first window brought them, so the header and the reasons read at once.
  const firstRead = readWindow<Answer>(first)
  const { data: summary, error: summaryError, retry: retrySummary } = useJson<Answer>('/api/triage?limit=1', {
    refreshMs: REFRESH_MS,
    fallbackData: 'page' in firstRead ? { counts: firstRead.page.counts } : undefined,
  })
  const ids = Object.keys(selection).map(Number)
  const activeReasons = new Set((params.get('reason') ?? '').split(',').filter(Boolean))

  const act = async (body: Record<string, unknown>) => {
    if (ids.length === 0) return setNotice({ tone: 'error', text: 'Select detectors first: x on a row, Shift+j/k to extend.' })
    setBusy(true)
    try {
      const answer = await fetchJson<{ message: string }>('/api/triage', { method: 'POST', json: { ...body, ids } })
      setNotice({ tone: 'ok', text: answer.message })
      setSelection({})
      // The queue changes under everyone's feet: refetch every window of it.
      await mutate((key) => typeof key === 'string' && key.startsWith('/api/triage'))
    } catch (e) {
      setNotice({ tone: 'error', text: e instanceof FetchError ? e.message : String(e) })
    } finally {
      setBusy(false)
    }
  }
  const acknowledgeSel = () => act({ intent: 'acknowledge' })
  const assignSel = () => act({ intent: 'assign', technicianId: Number(technician) })
  const bookSel = () => {
    if (ids.length === 0) return setNotice({ tone: 'error', text: 'Select detectors first: x on a row, Shift+j/k to extend.' })
    setBooking(true)
  }
  const booked = async (b: Booked) => {
    setBooking(false)
    setSelection({})
    setNotice({ tone: 'ok', text: b.message, visitId: b.visits.length === 1 ? b.visits[0].visitId : undefined })
    await mutate((key) => typeof key === 'string' && key.startsWith('/api/triage'))
  }

  usePaletteActions(
    ids.length === 0
      ? []
      : [
          ...(canTriage ? [{ id: 'ack', label: `Acknowledge ${ids.length} selected`, run: acknowledgeSel }] : []),
          ...(canTriage && technician ? [{ id: 'assign', label: `Assign ${ids.length} selected to ${technicians.find((t) => String(t.id) === technician)?.name}`, run: assignSel }] : []),
          ...(canSchedule ? [{ id: 'schedule', label: `Book a visit for ${ids.length} selected…`, run: bookSel }] : []),
          { id: 'clear', label: 'Clear the selection', run: () => setSelection({}) },
        ],
  )

  const toggleReason = (code: string) => {
    const next = new URLSearchParams(params)
    const set = new Set(activeReasons)
    if (set.has(code)) set.delete(code)
    else set.add(code)
    if (set.size) next.set('reason', [...set].join(','))
    else next.delete('reason')
    setParams(next, { replace: true })
  }

  return (
    <div className="mx-auto max-w-[100rem]">
      <PageHeader title="Triage">{summary ? `${formatCount(summary.counts.open)} open · ranked by risk, worst first` : summaryError ? 'Counts not loaded' : 'Loading…'}</PageHeader>
      {summaryError && <LoadError error={summaryError} onRetry={() => void retrySummary()} what="the counts" className="mb-3" />}

      <section aria-label="Reasons" className="-mx-4 mb-3 flex gap-1.5 overflow-x-auto px-4 pb-1 sm:mx-0 sm:flex-wrap sm:overflow-visible sm:px-0 sm:pb-0">
        {Object.entries(REASON_LABELS).map(([code, label]) => {
          const on = activeReasons.has(code)
          return (
            <button
              key={code}
              type="button"
              aria-pressed={on}
              onClick={() => toggleReason(code)}
              className={`shrink-0 rounded-sm border px-2.5 py-1 text-xs whitespace-nowrap ${on ? 'border-accent bg-accent text-accent-ink' : 'border-line-strong bg-panel text-ink hover:bg-sunken'}`}
            >
              {label} <span className="font-mono">{summary ? formatCount(summary.counts[code] ?? 0) : '…'}</span>
            </button>
          )
        })}
      </section>

      <FilterBar
        placeholder="Tag, site, street or town"
        filters={[{ param: 'acknowledged', label: 'Acknowledged', anyLabel: 'Open only', options: [{ value: 'only', label: 'Only acknowledged' }, { value: 'all', label: 'Open and acknowledged' }] }]}
      >
        <SavedViews page="triage" query={query} />
        <ExportButton page="triage" query={query} />
      </FilterBar>

      {(canTriage || canSchedule) && (
        // One line of fixed parts whatever the selection: choosing rows never moves the table.
        <section aria-label="Act on the selection" className="mb-3 flex flex-wrap items-end gap-2 rounded-md border border-line bg-panel px-3 py-2">
          <span className="mb-1.5 min-w-[9rem] text-sm font-medium">{ids.length === 0 ? 'Select rows to act' : `${formatCount(ids.length)} selected`}</span>
          {canTriage && (
            <>
              <button type="button" className={`${quietButtonClass} touch:min-h-11`} disabled={busy || ids.length === 0} onClick={acknowledgeSel}>
                Acknowledge
              </button>
              <label className="flex flex-col gap-1 text-xs font-medium text-ink-soft">
                Technician
                <select className={inputClass} value={technician} onChange={(e) => setTechnician(e.target.value)}>
                  {technicians.map((t) => (
                    <option key={t.id} value={t.id}>
                      {t.name}
                    </option>
                  ))}
                </select>
              </label>
              <button type="button" className={`${quietButtonClass} touch:min-h-11`} disabled={busy || ids.length === 0} onClick={assignSel}>
                Assign
              </button>
            </>
          )}
          {canSchedule && (
            <button type="button" className={`${buttonClass} touch:min-h-11`} disabled={busy || ids.length === 0} onClick={bookSel}>
              Book visit…
            </button>
          )}
          <span className="mb-1.5 text-xs text-ink-faint touch:hidden">x selects a row; Ctrl K lists what the selection can do.</span>
        </section>
      )}

      <DataTable<TriageRow>
        endpoint="/api/triage"
        query={query}
        columns={columns}
        rowHref={(r) => `/devices/${r.id}`}
        label="detectors in the queue"
        storageKey="triage"
        selection={selection}
        onSelectionChange={setSelection}
        refreshMs={REFRESH_MS}
        sortable={sortable}
        defaultSort={defaultSort}
        first={first}
        wrapRows
        phone={(r) => ({
          title: (
            <>
              <span className="font-mono">{r.tag}</span> <span className="font-mono text-xs text-ink-faint">risk {r.risk}</span>
            </>
          ),
          badges: (
            <>
              <StateBadge value={r.state} />
              {r.due && <StateBadge value={r.due} />}
            </>
          ),
          lines: [<Reasons key="why" reasons={r.reasons} followUp={r.followUp} />, `${r.site} · ${r.city}${r.assignee ? ` · ${r.assignee}` : ''}`],
        })}
      />

      {booking && <BookDialog ids={ids} onClose={() => setBooking(false)} onBooked={(b) => void booked(b)} />}
      {notice && (
        // Results float over the page's foot, so they never push the queue down either.
        <div className="fixed inset-x-3 bottom-3 z-30 mx-auto flex max-w-xl items-start gap-2 rounded-md bg-panel shadow-lg [&>p]:mb-0 [&>p]:flex-1">
          <Notice tone={notice.tone}>
            {notice.text}
            {notice.visitId && (
              <>
                {' '}
                <Link to={`/visits/${notice.visitId}`} className="underline">
                  Open visit {notice.visitId}
                </Link>
              </>
            )}
          </Notice>
          <button type="button" onClick={() => setNotice(null)} className="px-2 py-2 text-sm text-ink-soft" aria-label="Dismiss the message">
            ×
          </button>
        </div>
      )}
    </div>
  )
}
