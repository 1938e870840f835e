import { useState } from 'react'
import { usePaletteActions } from '~/components/command-palette'
import { quietButtonClass } from '~/components/ui/page-header'
import { useJson } from '~/components/use-json'
import { useRole } from '~/components/use-role'
import { can } from '~/domain/permissions'
import { formatCount } from '~/utils/format'
import type { Technician } from './action-fields'
import { BulkPanel } from './bulk-panel'
import { actionsFor, type BulkActionInfo, type BulkList, type BulkScope } from './catalog'

const NOUN: Record<BulkList, [string, string]> = {
  visits: ['visit', 'visits'],
  detectors: ['detector', 'detectors'],
  sites: ['site', 'sites'],
  customers: ['customer', 'customers'],
  events: ['event', 'events'],
}

// What a selection on a list other than detectors acts on, said once beside it.
const STANDS_FOR: Partial<Record<BulkList, string>> = {
  sites: 'Acts on the detectors at these sites',
  customers: "Acts on these customers' detectors",
  events: "Acts on these events' detectors",
}

/**
 * The bulk actions a list offers on its selection, or on every row its filter matches (counted and
 * resolved on the server, never loaded here). The same actions go to the command palette. On the
 * sites, customers and events lists they act on the detectors those rows stand for.
 */
export function BulkBar(p: { list: BulkList; endpoint: string; query: string; selected: number[]; technicians: Technician[]; today: string; onChanged: () => void }) {
  const role = useRole()
  const actions = actionsFor(p.list).filter((a) => role && can(role, a.capability))
  // "All matching" belongs to the filter it was chosen under: another filter drops it.
  const [allFor, setAllFor] = useState<string | null>(null)
  const all = allFor === p.query
  const setAll = (on: boolean) => setAllFor(on ? p.query : null)
  // The panel keeps the scope it was opened on: applying clears the list's selection beneath it.
  const [open, setOpen] = useState<{ action: BulkActionInfo; scope: BulkScope; label: string } | null>(null)
  const { data } = useJson<{ total: number; totalCapped?: boolean }>(actions.length ? `${p.endpoint}?${p.query ? `${p.query}&` : ''}limit=1` : null, { revalidateOnFocus: false })
  const total = data?.total ?? null
  const totalWords = total === null ? '' : `${data?.totalCapped ? 'more than ' : ''}${formatCount(total)} `
  const [one, many] = NOUN[p.list]
  const through = p.list === 'sites' || p.list === 'customers' || p.list === 'events' ? { list: p.list } : {}
  const scope: BulkScope | null = all ? { filter: p.query, ...through } : p.selected.length ? { ids: p.selected, ...through } : null
  const scopeLabel = all ? `all ${totalWords}${many} matching this filter` : `${formatCount(p.selected.length)} selected ${p.selected.length === 1 ? one : many}`

  usePaletteActions(scope ? actions.map((a) => ({ id: `bulk:${a.name}`, label: `${a.title}: ${scopeLabel}…`, run: () => setOpen({ action: a, scope, label: scopeLabel }) })) : [])

  if (actions.length === 0) return null
  return (
    <section aria-label="Change many at once" className="mb-3 flex flex-col gap-2 rounded-md border border-line bg-panel px-3 py-2 text-sm lg:flex-row lg:items-center">
      <div className="flex flex-wrap items-center gap-x-3 gap-y-1">
        <span className="font-medium" aria-live="polite">
          {scope ? scopeLabel : `Select ${many} to act on them together`}
        </span>
        <button type="button" aria-pressed={all} className={quietButtonClass} onClick={() => setAll(!all)} disabled={total === 0}>
          {all ? 'Only the selected' : `All ${totalWords}matching`}
        </button>
        {STANDS_FOR[p.list] && <span className="text-xs text-ink-faint">{STANDS_FOR[p.list]}</span>}
      </div>
      <div role="group" aria-label="Actions" className="flex flex-wrap items-center gap-2 border-t border-line pt-2 lg:ml-auto lg:border-t-0 lg:border-l lg:pt-0 lg:pl-3">
        {actions.map((a) => (
          <button key={a.name} type="button" className={`${quietButtonClass} disabled:cursor-not-allowed disabled:opacity-50`} disabled={!scope} onClick={() => scope && setOpen({ action: a, scope, label: scopeLabel })}>
            {a.title}…
          </button>
        ))}
      </div>
      {open && (
        <BulkPanel action={open.action} scope={open.scope} scopeLabel={open.label} technicians={p.technicians} today={p.today} onClose={() => setOpen(null)} onChanged={p.onChanged} />
      )}
    </section>
  )
}
