import type { ColumnDef, RowSelectionState } from '@tanstack/react-table'
import { useMemo, useState } from 'react'
import { useSearchParams } from 'react-router'
import { useSWRConfig } from 'swr'
import { requireUser } from '~/.server/auth'
import { getDb } from '~/.server/db'
import { deviceList } from '~/.server/lists/devices'
import { triageQuery, type TriageRow } from '~/.server/lists/triage'
import { officeToday } from '~/.server/today'
import { Caution } from '~/components/caution'
import { badgeCell, linkCell, monoCell, selectColumn } from '~/components/columns'
import { usePaletteActions } from '~/components/command-palette'
import { DataTable } from '~/components/data-table'
import { FilterBar, listQuery } from '~/components/filter-bar'
import { LoadError } from '~/components/load-error'
import { SavedViews } from '~/components/saved-views'
import { useJson } from '~/components/use-json'
import { buttonClass, inputClass, Notice, PageHeader, quietButtonClass } from '~/components/ui/page-header'
import { can, type RouteAccess } from '~/domain/permissions'
import { FetchError, fetchJson } from '~/utils/fetch-json'
import { formatCount } from '~/utils/format'
import type { Route } from './+types/_app.triage'

export const handle = { access: { loader: 'view:fleet' } satisfies RouteAccess }

export const meta: Route.MetaFunction = () => [{ title: 'Triage · Ductkeeper' }]

export async function loader({ request }: Route.LoaderArgs) {
  const user = await requireUser(request, 'view:fleet')
  const technicians = getDb().$client.prepare("select id, name from users where role = 'technician' and active = 1 order by name").all() as Array<{ id: number; name: string }>
  return {
    technicians,
    today: officeToday(),
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
}

const columns: ColumnDef<TriageRow>[] = [
  selectColumn(),
  { id: 'risk', header: 'Risk', size: 76, cell: monoCell((r) => r.risk) },
  { id: 'tag', header: 'Tag', size: 104, cell: linkCell((r) => `/devices/${r.id}`, (r) => r.tag, true) },
  {
    id: 'reasons',
    header: 'Why',
    size: 3,
    minSize: 260,
    enableSorting: false,
    cell: ({ row }) => (
      <span title={[...row.original.reasons.map((r) => `${r.text} (+${r.points})`), row.original.followUp ? `Technician: ${row.original.followUp}` : ''].filter(Boolean).join('\n')}>
        {row.original.reasons.map((r) => REASON_LABELS[r.code] ?? r.text).join(' · ')}
        {row.original.followUp && <span className="text-ink-soft"> · “{row.original.followUp}”</span>}
      </span>
    ),
  },
  { id: 'site', header: 'Site', size: 2, minSize: 180, cell: linkCell((r) => `/sites/${r.siteId}`, (r) => r.site) },
  { id: 'state', header: 'State', size: 132, cell: badgeCell((r) => r.state) },
  { id: 'due', header: 'Due', size: 116, cell: badgeCell((r) => r.due) },
  { id: 'assignee', header: 'Assigned', size: 140, enableSorting: false, cell: ({ row }) => row.original.assignee ?? <span className="text-ink-faint">—</span> },
]

interface Answer {
  counts: Record<string, number> & { open: number }
}

export default function Triage({ loaderData }: Route.ComponentProps) {
  const { technicians, today, canTriage, canSchedule, sortable, defaultSort } = loaderData
  const [params, setParams] = useSearchParams()
  const query = useMemo(() => listQuery(params), [params])
  const [selection, setSelection] = useState<RowSelectionState>({})
  const [technician, setTechnician] = useState<string>(String(technicians[0]?.id ?? ''))
  const [date, setDate] = useState(today)
  const [notice, setNotice] = useState<{ tone: 'ok' | 'error'; text: string } | null>(null)
  const [busy, setBusy] = useState(false)
  const { mutate } = useSWRConfig()
  // The counts ride along with any window of the queue; this one asks for the smallest.
  const { data: summary, error: summaryError, retry: retrySummary } = useJson<Answer>('/api/triage?limit=1', { refreshMs: REFRESH_MS })
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
  const scheduleSel = () => act({ intent: 'schedule', date, kind: 'test', technicianId: technician ? Number(technician) : null })

  usePaletteActions(
    ids.length === 0
      ? []
      : [
          ...(canTriage ? [{ id: 'ack', label: `Acknowledge ${ids.length} selected`, run: acknowledgeSel }] : []),
          ...(canTriage && technician ? [{ id: 'assign', label: `Assign ${ids.length} selected to ${technicians.find((t) => String(t.id) === technician)?.name}`, run: assignSel }] : []),
          ...(canSchedule ? [{ id: 'schedule', label: `Book a visit on ${date} for ${ids.length} selected`, run: scheduleSel }] : []),
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

      <section aria-label="Reasons" className="mb-3 flex flex-wrap gap-1.5">
        {Object.entries(REASON_LABELS).map(([code, label]) => {
          const on = activeReasons.has(code)
          return (
            <button
              key={code}
              type="button"
              aria-pressed={on}
              onClick={() => toggleReason(code)}
              className={`rounded-sm border px-2.5 py-1 text-xs ${on ? 'border-accent bg-accent text-accent-ink' : 'border-line-strong bg-panel text-ink hover:bg-sunken'}`}
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
      </FilterBar>

      {(canTriage || canSchedule) && (
        <section aria-label="Act on the selection" className="mb-3 flex flex-wrap items-end gap-2 rounded-md border border-line bg-panel px-3 py-2">
          <span className="mb-1.5 text-sm font-medium">{ids.length === 0 ? 'Select rows to act on them' : `${ids.length} selected`}</span>
          {canTriage && (
            <button type="button" className={quietButtonClass} disabled={busy || ids.length === 0} onClick={acknowledgeSel}>
              Acknowledge
            </button>
          )}
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
          {canTriage && (
            <button type="button" className={quietButtonClass} disabled={busy || ids.length === 0} onClick={assignSel}>
              Assign
            </button>
          )}
          {canSchedule && (
            <>
              <label className="flex flex-col gap-1 text-xs font-medium text-ink-soft">
                Visit date
                <input type="date" className={inputClass} min={today} value={date} onChange={(e) => setDate(e.target.value)} />
              </label>
              <button type="button" className={buttonClass} disabled={busy || ids.length === 0} onClick={scheduleSel}>
                Book visit
              </button>
            </>
          )}
          <span className="mb-1.5 text-xs text-ink-faint">Also in the palette (Ctrl K) once rows are selected.</span>
        </section>
      )}
      {notice && <Notice tone={notice.tone}>{notice.text}</Notice>}
      {canSchedule && ids.length > 0 && (
        <div className="mb-3">
          <Caution compact />
        </div>
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
      />
    </div>
  )
}
