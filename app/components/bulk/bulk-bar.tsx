import { useState } from 'react'
import { usePaletteActions } from '~/components/command-palette'
import { quietButtonClass } from '~/components/ui/page-header'
import { useJson } from '~/components/use-json'
import { useRole } from '~/components/use-role'
import { can } from '~/domain/permissions'
import { formatCount } from '~/utils/format'
import type { Technician } from './action-fields'
import { BulkPanel } from './bulk-panel'
import { BULK_ACTIONS, type BulkActionInfo, type BulkScope } from './catalog'

/**
 * The bulk actions a list offers on its selection, or on every row its filter matches (counted and
 * resolved on the server, never loaded here). The same actions go to the command palette.
 */
export function BulkBar(p: { entity: 'visit' | 'detector'; endpoint: string; query: string; selected: number[]; technicians: Technician[]; onChanged: () => void }) {
  const role = useRole()
  const actions = BULK_ACTIONS.filter((a) => a.entity === p.entity && role && can(role, a.capability))
  // "All matching" belongs to the filter it was chosen under: another filter drops it.
  const [allFor, setAllFor] = useState<string | null>(null)
  const all = allFor === p.query
  const setAll = (on: boolean) => setAllFor(on ? p.query : null)
  // The panel keeps the scope it was opened on: applying clears the list's selection beneath it.
  const [open, setOpen] = useState<{ action: BulkActionInfo; scope: BulkScope; label: string } | null>(null)
  const { data } = useJson<{ total: number }>(actions.length ? `${p.endpoint}?${p.query ? `${p.query}&` : ''}limit=1` : null, { revalidateOnFocus: false })
  const total = data?.total ?? null
  const noun = p.entity === 'visit' ? 'visits' : 'detectors'
  const scope: BulkScope | null = all ? { filter: p.query } : p.selected.length ? { ids: p.selected } : null
  const scopeLabel = all ? `all ${total === null ? '' : `${formatCount(total)} `}${noun} matching this filter` : `${formatCount(p.selected.length)} selected ${noun}`

  usePaletteActions(scope ? actions.map((a) => ({ id: `bulk:${a.name}`, label: `${a.title}: ${scopeLabel}…`, run: () => setOpen({ action: a, scope, label: scopeLabel }) })) : [])

  if (actions.length === 0) return null
  return (
    <section aria-label="Change many at once" className="mb-3 flex flex-wrap items-center gap-2 rounded-md border border-line bg-panel px-3 py-2 text-sm">
      <span className="min-w-[10rem] font-medium">{scope ? scopeLabel : `Select ${noun} to change them together`}</span>
      <button type="button" aria-pressed={all} className={quietButtonClass} onClick={() => setAll(!all)} disabled={total === 0}>
        {all ? 'Only the selected' : `All ${total === null ? '' : `${formatCount(total)} `}matching`}
      </button>
      <span className="mx-1 h-5 w-px bg-line" aria-hidden="true" />
      {actions.map((a) => (
        <button key={a.name} type="button" className={quietButtonClass} disabled={!scope} onClick={() => scope && setOpen({ action: a, scope, label: scopeLabel })}>
          {a.title}…
        </button>
      ))}
      {open && <BulkPanel action={open.action} scope={open.scope} scopeLabel={open.label} technicians={p.technicians} onClose={() => setOpen(null)} onChanged={p.onChanged} />}
    </section>
  )
}
