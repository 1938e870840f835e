import { useEffect, useRef, useState } from 'react'
import { buttonClass, quietButtonClass } from '~/components/ui/page-header'
import { FetchError, fetchJson } from '~/utils/fetch-json'
import { formatCount } from '~/utils/format'

export interface RunPreview {
  selected: number
  summary: string
  changeCount: number
  refusedCount: number
  changes: Array<{ id: number; label: string; to: Record<string, unknown> }>
  refused: Array<{ id: number; label: string; reason: string }>
  extra?: { cautions?: string[] } & Record<string, unknown>
  previewId: string
}
interface RunResult {
  changeId: number | null
  applied: number
  refusedCount: number
  summary: string
}

type Phase = 'idle' | 'previewing' | 'previewed' | 'applying' | 'done' | 'undoing' | 'undone'

const cell = (v: unknown) => (v === null || v === undefined || v === '' ? '—' : String(v))

/**
 * One bulk change worked in place: preview (nothing written), apply exactly what was previewed,
 * then undo while nobody has touched the result. `body` is the action's request without `preview`.
 */
export function RunPanel(p: {
  action: string
  body: Record<string, unknown>
  label: string
  applyLabel: (n: number) => string
  columns: Array<{ key: string; label: string }>
  onChanged?: () => void
  onPreview?: (preview: RunPreview | null) => void
  disabled?: boolean
  /** Preview again by itself whenever the settings change after a first preview (hand changes to a plan). */
  autoPreview?: boolean
  /** Leave out the list of changes (the page draws the plan itself). */
  hideChanges?: boolean
}) {
  const [phase, setPhase] = useState<Phase>('idle')
  const [preview, setPreview] = useState<RunPreview | null>(null)
  const [result, setResult] = useState<RunResult | null>(null)
  const [error, setError] = useState<string | null>(null)
  const [bodyKey, setBodyKey] = useState('')
  const key = JSON.stringify(p.body)
  // Other settings than the ones previewed: the preview no longer stands.
  const stale = preview !== null && bodyKey !== key && phase === 'previewed' && !p.autoPreview

  const post = <T,>(json: unknown, url = `/api/bulk/${p.action}`) => fetchJson<T>(url, { method: 'POST', json })
  const fail = (e: unknown, back: Phase) => {
    setError(e instanceof FetchError ? e.message : String(e))
    setPhase(back)
  }
  async function runPreview() {
    setError(null)
    setResult(null)
    setPhase('previewing')
    try {
      const answer = await post<RunPreview>({ preview: true, ...p.body })
      setPreview(answer)
      setBodyKey(key)
      p.onPreview?.(answer)
      setPhase('previewed')
    } catch (e) {
      fail(e, 'idle')
    }
  }
  async function apply() {
    if (!preview) return
    const { ids: _ids, filter: _filter, ...input } = p.body
    setPhase('applying')
    try {
      setResult(await post<RunResult>({ preview: false, previewId: preview.previewId, ...input }))
      setPhase('done')
      p.onChanged?.()
    } catch (e) {
      fail(e, 'previewed')
    }
  }
  async function undo() {
    if (!result?.changeId) return
    setPhase('undoing')
    try {
      await post({ changeId: result.changeId }, '/api/bulk/undo')
      setPhase('undone')
      p.onChanged?.()
    } catch (e) {
      fail(e, 'done')
    }
  }

  const again = useRef(runPreview)
  useEffect(() => {
    again.current = runPreview
  })
  useEffect(() => {
    if (p.autoPreview && bodyKey && bodyKey !== key) void again.current()
  }, [p.autoPreview, key, bodyKey])

  const busy = phase === 'previewing' || phase === 'applying' || phase === 'undoing'
  return (
    <div className="flex flex-col gap-3 text-sm">
      <div className="flex flex-wrap items-center gap-2">
        <button type="button" className={quietButtonClass + ' min-h-11 sm:min-h-9'} disabled={busy || p.disabled} onClick={() => void runPreview()}>
          Preview {p.label}
        </button>
        {phase === 'previewed' && preview && !stale && (
          <button type="button" className={buttonClass} disabled={preview.changeCount === 0} onClick={() => void apply()}>
            {p.applyLabel(preview.changeCount)}
          </button>
        )}
        {phase === 'done' && result?.changeId && (
          <button type="button" className={quietButtonClass + ' min-h-11 sm:min-h-9'} onClick={() => void undo()}>
            Undo
          </button>
        )}
        {busy && (
          <span role="status" className="text-ink-soft">
            {phase === 'previewing' ? 'Working it out…' : phase === 'applying' ? 'Applying…' : 'Undoing…'}
          </span>
        )}
      </div>
      {error && (
        <p role="alert" className="rounded-sm bg-late-soft px-3 py-2 text-late">
          {error}
        </p>
      )}
      {stale && <p className="text-ink-soft">The settings changed since the preview: preview again before applying.</p>}
      {result && (
        <p role="status" className="rounded-sm bg-ok-soft px-3 py-2 text-ok">
          {phase === 'undone'
            ? `Undone: ${formatCount(result.applied)} put back as they were.`
            : `Done: ${result.summary}. ${formatCount(result.applied)} applied${result.refusedCount ? `, ${formatCount(result.refusedCount)} left as they were` : ''}.`}
        </p>
      )}
      {preview && phase !== 'done' && phase !== 'undone' && phase !== 'undoing' && (
        <section aria-label="Preview" className="flex flex-col gap-2">
          <p className="font-medium">
            {preview.summary}. Nothing has changed yet.
          </p>
          {preview.extra?.cautions?.map((c) => (
            <p key={c} role="note" className="rounded-sm border border-soon/40 bg-soon-soft px-3 py-2">
              {c}
            </p>
          ))}
          {preview.changes.length > 0 && !p.hideChanges && (
            <div className="max-h-96 overflow-auto rounded-sm border border-line">
              <table className="w-full text-left text-xs">
                <caption className="sr-only">What would change</caption>
                <thead className="sticky top-0 bg-sunken text-ink-soft">
                  <tr>
                    {p.columns.map((c) => (
                      <th key={c.key} className="px-2 py-1 font-medium">
                        {c.label}
                      </th>
                    ))}
                  </tr>
                </thead>
                <tbody>
                  {preview.changes.map((c) => (
                    <tr key={c.id} className="border-t border-line/60">
                      {p.columns.map((col) => (
                        <td key={col.key} className="px-2 py-1">
                          {col.key === 'label' ? c.label : cell(c.to[col.key])}
                        </td>
                      ))}
                    </tr>
                  ))}
                </tbody>
              </table>
              {preview.changes.length < preview.changeCount && (
                <p className="px-2 py-1 text-xs text-ink-soft">
                  The first {preview.changes.length} of {formatCount(preview.changeCount)}; all are applied.
                </p>
              )}
            </div>
          )}
          {preview.refusedCount > 0 && (
            <details className="text-xs">
              <summary className="cursor-pointer text-late">{formatCount(preview.refusedCount)} left out, with the reason</summary>
              <ul>
                {preview.refused.map((r) => (
                  <li key={r.id} className="border-t border-line/60 py-1">
                    {r.label}: <span className="text-late">{r.reason}</span>
                  </li>
                ))}
              </ul>
            </details>
          )}
        </section>
      )}
    </div>
  )
}
