import { useEffect, useRef, useState } from 'react'
import { useShortcut } from '~/components/keyboard'
import { buttonClass, quietButtonClass } from '~/components/ui/page-header'
import { formatCount } from '~/utils/format'
import { FetchError, fetchJson } from '~/utils/fetch-json'
import { ActionFields, initialInput, type Technician } from './action-fields'
import type { ApplyAnswer, BulkActionInfo, BulkScope, DayLoad, PreviewAnswer } from './catalog'

type Phase = 'choose' | 'previewing' | 'previewed' | 'applying' | 'done' | 'undoing' | 'undone'

const show = (fields: Record<string, unknown>) =>
  Object.entries(fields)
    .map(([k, v]) => `${k}: ${v === null || v === '' ? '—' : String(v).replace(/T(\d\d:\d\d).*Z$/, ' $1')}`)
    .join(', ')

/**
 * One bulk change, from choosing through preview to apply and undo, in a modal dialog worked from
 * the keyboard: the first field has the focus, Enter previews and then applies, Esc closes.
 */
export function BulkPanel(p: {
  action: BulkActionInfo
  scope: BulkScope
  scopeLabel: string
  technicians: Technician[]
  today: string
  onClose: () => void
  onChanged: () => void
}) {
  const dialog = useRef<HTMLDialogElement>(null)
  const applyButton = useRef<HTMLButtonElement>(null)
  const undoButton = useRef<HTMLButtonElement>(null)
  const [input, setInput] = useState(() => initialInput(p.action.name, p.today, p.technicians))
  const [phase, setPhase] = useState<Phase>('choose')
  const [preview, setPreview] = useState<PreviewAnswer | null>(null)
  const [result, setResult] = useState<ApplyAnswer | null>(null)
  const [undone, setUndone] = useState<number | null>(null)
  const [error, setError] = useState<string | null>(null)

  useEffect(() => {
    const d = dialog.current
    if (d && !d.open) d.showModal()
  }, [])
  // Escape closes the panel and leaves the list's selection as it was (the newest handler wins).
  useShortcut('close', () => dialog.current?.close())
  useEffect(() => {
    if (phase === 'previewed') applyButton.current?.focus()
    if (phase === 'done') undoButton.current?.focus()
  }, [phase])

  const post = <T,>(url: string, json: unknown) => fetchJson<T>(url, { method: 'POST', json })
  const fail = (e: unknown, back: Phase) => {
    setError(e instanceof FetchError ? e.message : String(e))
    setPhase(back)
  }
  const change = (next: Record<string, unknown>) => {
    setInput(next)
    // New settings need a new preview before anything is applied.
    if (phase === 'previewed') setPhase('choose')
    setPreview(null)
  }

  async function submit(e?: React.FormEvent) {
    e?.preventDefault()
    setError(null)
    if (phase === 'choose') {
      setPhase('previewing')
      try {
        setPreview(await post<PreviewAnswer>(`/api/bulk/${p.action.name}`, { preview: true, ...p.scope, ...input }))
        setPhase('previewed')
      } catch (err) {
        fail(err, 'choose')
      }
    } else if (phase === 'previewed' && preview) {
      if (preview.changeCount === 0) return
      setPhase('applying')
      try {
        setResult(await post<ApplyAnswer>(`/api/bulk/${p.action.name}`, { preview: false, previewId: preview.previewId, ...input }))
        setPhase('done')
        p.onChanged()
      } catch (err) {
        fail(err, 'previewed')
      }
    }
  }

  async function undo() {
    if (!result?.changeId) return
    setError(null)
    setPhase('undoing')
    try {
      const answer = await post<{ restored: number }>('/api/bulk/undo', { changeId: result.changeId })
      setUndone(answer.restored)
      setPhase('undone')
      p.onChanged()
    } catch (err) {
      fail(err, 'done')
    }
  }

  const busy = phase === 'previewing' || phase === 'applying' || phase === 'undoing'
  const finished = phase === 'done' || phase === 'undoing' || phase === 'undone'
  return (
    <dialog
      ref={dialog}
      aria-labelledby="bulk-title"
      onClose={p.onClose}
      className="m-auto max-h-[90dvh] w-[min(60rem,95vw)] rounded-md border border-line bg-panel p-0 text-ink shadow-xl backdrop:bg-ink/30"
    >
      <form onSubmit={submit} className="flex max-h-[90dvh] flex-col">
        <header className="flex items-baseline justify-between gap-2 border-b border-line px-4 py-3">
          <h2 id="bulk-title" className="text-lg font-semibold">
            {p.action.title} · {p.scopeLabel}
          </h2>
          <span className="text-xs text-ink-faint touch:hidden">Enter to {phase === 'previewed' ? 'apply' : 'preview'} · Esc to close</span>
        </header>
        <div className="flex flex-col gap-4 overflow-auto px-4 py-3">
          <fieldset disabled={finished || busy}>
            <ActionFields action={p.action.name} value={input} onChange={change} technicians={p.technicians} />
          </fieldset>
          {error && (
            <p role="alert" className="rounded-sm bg-late-soft px-3 py-2 text-sm text-late">
              {error}
            </p>
          )}
          {busy && (
            <div role="status" className="flex items-center gap-3 text-sm text-ink-soft">
              <progress className="h-2 w-48" aria-label="Working" />
              {phase === 'previewing' ? 'Working out each record…' : phase === 'applying' ? `Applying to ${formatCount(preview?.changeCount ?? 0)} records…` : 'Putting the records back…'}
            </div>
          )}
          {preview && !finished && <PreviewView preview={preview} />}
          {result && (
            <section aria-label="Result" role="status" className="rounded-sm bg-ok-soft px-3 py-2 text-sm text-ok">
              {phase === 'undone'
                ? `Undone: ${formatCount(undone ?? 0)} records put back as they were.`
                : `Applied: ${result.summary}. ${formatCount(result.applied)} changed${result.refusedCount ? `, ${formatCount(result.refusedCount)} left as they were` : ''}.`}
            </section>
          )}
          {result && result.refusedCount > 0 && phase !== 'undone' && <RefusedList refused={result.refused} total={result.refusedCount} />}
        </div>
        <footer className="flex items-center justify-end gap-2 border-t border-line px-4 py-3">
          {phase === 'done' && result?.changeId && (
            <button ref={undoButton} type="button" className={quietButtonClass} onClick={() => void undo()}>
              Undo
            </button>
          )}
          <button type="button" className={quietButtonClass} onClick={() => dialog.current?.close()}>
            Close
          </button>
          {!finished && (
            <button ref={applyButton} type="submit" className={buttonClass} disabled={busy || (phase === 'previewed' && preview?.changeCount === 0)}>
              {phase === 'previewed' && preview
                ? booksVisits(preview)
                  ? `Book ${count(preview.changeCount, ['visit', 'visits'])}`
                  : `Apply to ${formatCount(preview.changeCount)}`
                : 'Preview'}
            </button>
          )}
        </footer>
      </form>
    </dialog>
  )
}

const LIST_NOUNS = { sites: ['site', 'sites'], customers: ['customer', 'customers'], events: ['event', 'events'] } as const
const count = (n: number, [one, many]: readonly [string, string]) => `${formatCount(n)} ${n === 1 ? one : many}`

/** What a selection of sites, customers or events stands for: the detectors the action works on. */
function ThroughLine({ through }: { through: NonNullable<PreviewAnswer['through']> }) {
  const sitewide = through.withoutDetector ? ` (${count(through.withoutDetector, ['event', 'events'])} of a whole site, with no detector, left out)` : ''
  const verb = through.records === 1 ? 'stands' : 'stand'
  return (
    <p className="rounded-sm bg-sunken px-3 py-2">
      The {count(through.records, LIST_NOUNS[through.list])} {verb} for <strong>{count(through.detectors, ['detector', 'detectors'])}</strong>
      {sitewide}.
    </p>
  )
}

/** Whether the preview books visits (delay corrections, cleaning cycles) rather than changing the selected records. */
export const booksVisits = (preview: PreviewAnswer) => preview.changes.some((c) => c.create !== undefined)

function PreviewView({ preview }: { preview: PreviewAnswer }) {
  const x = preview.extra
  const books = booksVisits(preview)
  return (
    <section aria-label="Preview" className="flex flex-col gap-3 text-sm">
      {preview.through && <ThroughLine through={preview.through} />}
      <p className="font-medium">
        {preview.summary}.{' '}
        {books
          ? `${count(preview.changeCount, ['visit', 'visits'])} to book for the ${count(preview.selected, preview.through ? ['detector', 'detectors'] : ['selected detector', 'selected detectors'])}`
          : preview.through
            ? `${formatCount(preview.changeCount)} of the ${count(preview.selected, ['detector', 'detectors'])} will change`
            : `${formatCount(preview.changeCount)} of ${formatCount(preview.selected)} selected will change`}
        {preview.refusedCount > 0 && `; ${formatCount(preview.refusedCount)} refused`}. Nothing has changed yet.
      </p>
      {x?.audit && (
        <p>
          Of these detectors, {formatCount(x.audit.agree)} agree with their site&apos;s delay policy, {formatCount(x.audit.disagree)} disagree and{' '}
          {formatCount(x.audit.unknown)} were never recorded.
        </p>
      )}
      {x?.cautions?.map((c) => (
        <p key={c} role="note" className="rounded-sm border border-late/40 bg-late-soft px-3 py-2">
          {c}
        </p>
      ))}
      {x?.notDue !== undefined && x.notDue > 0 && (
        <p className="text-ink-soft">
          {formatCount(x.notDue)} of the selected detectors are not due for cleaning by {x.dueBy}.
        </p>
      )}
      {x?.history && preview.changeCount > 0 && (
        <p className="text-ink-soft">
          Each detector&apos;s history will say: <q>{x.history}</q>, under your name and today&apos;s time.
        </p>
      )}
      {preview.changes.length > 0 && (
        <table className="w-full text-left text-xs">
          <caption className="mb-1 text-left text-ink-soft">
            {preview.changes.length < preview.changeCount ? `The first ${preview.changes.length} of ${formatCount(preview.changeCount)} changes` : 'Changes'}
          </caption>
          <thead className="text-ink-soft">
            <tr>
              <th className="py-1 pr-3 font-medium">Record</th>
              {!books && <th className="py-1 pr-3 font-medium">From</th>}
              <th className="py-1 font-medium">{books ? 'Visit' : 'To'}</th>
            </tr>
          </thead>
          <tbody>
            {preview.changes.map((c) => (
              <tr key={c.id} className="border-t border-line/60">
                <td className="py-1 pr-3">{c.label}</td>
                {!books && <td className="py-1 pr-3 font-mono text-ink-soft">{show(c.from)}</td>}
                <td className="py-1 font-mono">{show(c.to)}</td>
              </tr>
            ))}
          </tbody>
        </table>
      )}
      {preview.refusedCount > 0 && <RefusedList refused={preview.refused} total={preview.refusedCount} />}
      {preview.extra?.dayLoads && preview.extra.dayLoads.length > 0 && <DayLoads loads={preview.extra.dayLoads} />}
    </section>
  )
}

function RefusedList({ refused, total }: { refused: PreviewAnswer['refused']; total: number }) {
  return (
    <div>
      <h3 className="mb-1 text-xs font-medium text-late">
        Refused{refused.length < total ? ` (the first ${refused.length} of ${formatCount(total)})` : ''}
      </h3>
      <ul className="text-xs">
        {refused.map((r) => (
          <li key={r.id} className="border-t border-line/60 py-1">
            {r.label}: <span className="text-late">{r.reason}</span>
          </li>
        ))}
      </ul>
    </div>
  )
}

function DayLoads({ loads }: { loads: DayLoad[] }) {
  return (
    <table className="w-full max-w-xl text-left text-xs">
      <caption className="mb-1 text-left text-ink-soft">Each technician's day, before and after</caption>
      <thead className="text-ink-soft">
        <tr>
          <th className="py-1 pr-3 font-medium">Technician</th>
          <th className="py-1 pr-3 font-medium">Day</th>
          <th className="py-1 pr-3 font-medium">Before</th>
          <th className="py-1 font-medium">After</th>
        </tr>
      </thead>
      <tbody>
        {loads.map((l) => (
          <tr key={`${l.technicianId}|${l.date}`} className="border-t border-line/60">
            <td className="py-1 pr-3">{l.technician}</td>
            <td className="py-1 pr-3 font-mono">{l.date}</td>
            <td className="py-1 pr-3 font-mono">{l.before}</td>
            <td className={`py-1 font-mono ${l.capacity !== null && l.after >= l.capacity ? 'font-semibold text-soon' : ''}`}>
              {l.after}
              {l.capacity !== null ? ` of ${l.capacity} ${l.unit}` : ` ${l.unit}, no limit set`}
            </td>
          </tr>
        ))}
      </tbody>
    </table>
  )
}
