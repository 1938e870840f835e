import { useState } from 'react'
import { useSearchParams } from 'react-router'
import { FetchError, fetchJson } from '~/utils/fetch-json'
import { LoadError } from './load-error'
import { buttonClass, inputClass, quietButtonClass } from './ui/page-header'
import { useJson } from './use-json'

interface View {
  id: number
  name: string
  query: string
}

// What the control is doing: each step that could lose a view waits for a yes first.
type Step =
  | { kind: 'idle' }
  | { kind: 'naming' }
  | { kind: 'confirm-save'; name: string }
  | { kind: 'renaming'; view: View }
  | { kind: 'confirm-rename'; view: View; name: string }
  | { kind: 'confirm-delete'; view: View }

/** Named filter sets for a list page, per person: open, save, rename, delete. */
export function SavedViews({ page, query }: { page: string; query: string }) {
  const [, setParams] = useSearchParams()
  const key = `/api/views?page=${page}`
  const { data, error, retry, mutate } = useJson<{ views: View[] }>(key)
  const [step, setStep] = useState<Step>({ kind: 'idle' })
  const [name, setName] = useState('')
  const [message, setMessage] = useState<{ tone: 'ok' | 'error'; text: string } | null>(null)
  const [busy, setBusy] = useState(false)
  const views = data?.views ?? []
  // The view whose filters are on screen now, if any: the list shows it as chosen.
  const current = views.find((v) => v.query === query)

  const send = async (body: Record<string, unknown>, done: string): Promise<'ok' | 'clash' | 'failed'> => {
    setBusy(true)
    try {
      await fetchJson('/api/views', { method: 'POST', json: body })
      // The list is fresh before the confirmation shows.
      await mutate()
      setMessage({ tone: 'ok', text: done })
      return 'ok'
    } catch (e) {
      if (e instanceof FetchError && e.status === 409) return 'clash'
      setMessage({ tone: 'error', text: e instanceof Error ? e.message : String(e) })
      return 'failed'
    } finally {
      setBusy(false)
    }
  }

  const save = async (overwrite: boolean) => {
    const n = name.trim()
    const r = await send({ intent: 'save', page, name: n, query, overwrite }, `Saved “${n}”.`)
    if (r === 'clash') setStep({ kind: 'confirm-save', name: n })
    if (r === 'ok') {
      setStep({ kind: 'idle' })
      setName('')
    }
  }
  const rename = async (view: View, overwrite: boolean) => {
    const n = name.trim()
    const r = await send({ intent: 'rename', id: view.id, name: n, overwrite }, `Renamed “${view.name}” to “${n}”.`)
    if (r === 'clash') setStep({ kind: 'confirm-rename', view, name: n })
    if (r === 'ok') {
      setStep({ kind: 'idle' })
      setName('')
    }
  }
  const remove = async (view: View) => {
    if ((await send({ intent: 'delete', id: view.id }, `Deleted “${view.name}”.`)) === 'ok') setStep({ kind: 'idle' })
  }
  const cancel = () => {
    setStep({ kind: 'idle' })
    setName('')
  }

  if (error && !data) return <LoadError error={error} onRetry={() => void retry()} what="saved views" />

  return (
    <div className="flex flex-wrap items-end gap-2">
      <label className="flex flex-col gap-1 text-xs font-medium text-ink-soft">
        Saved views
        <select
          className={inputClass}
          value={current ? String(current.id) : ''}
          onChange={(e) => {
            const view = views.find((v) => String(v.id) === e.target.value)
            if (view) {
              setMessage(null)
              setParams(new URLSearchParams(view.query))
            }
          }}
        >
          <option value="">{views.length ? 'Open a view…' : 'None yet'}</option>
          {views.map((v) => (
            <option key={v.id} value={v.id}>
              {v.name}
            </option>
          ))}
        </select>
      </label>

      {step.kind === 'naming' && (
        <form
          className="flex items-end gap-1"
          onSubmit={(e) => {
            e.preventDefault()
            void save(false)
          }}
        >
          <input autoFocus aria-label="View name" value={name} onChange={(e) => setName(e.target.value)} maxLength={60} className={`${inputClass} w-40`} placeholder="Name this view" />
          <button type="submit" className={`${quietButtonClass} mb-0.5`} disabled={busy}>
            Save
          </button>
          <button type="button" className={`${quietButtonClass} mb-0.5`} onClick={cancel}>
            Cancel
          </button>
        </form>
      )}
      {step.kind === 'idle' && (
        <button
          type="button"
          className={`${quietButtonClass} mb-0.5`}
          onClick={() => {
            setMessage(null)
            setStep({ kind: 'naming' })
          }}
        >
          Save view…
        </button>
      )}
      {step.kind === 'idle' && views.length > 0 && (
        <details className="relative mb-0.5">
          <summary className={`${quietButtonClass} cursor-pointer list-none`}>Manage views</summary>
          <ul aria-label="Your saved views" className="absolute left-0 z-20 mt-1 w-72 max-w-[calc(100vw-2rem)] space-y-1 rounded-md border border-line bg-panel p-2 shadow-lg">
            {views.map((v) => (
              <li key={v.id} className="flex items-center gap-1 text-sm">
                <span className="min-w-0 flex-1 truncate" title={v.query || 'No filters'}>
                  {v.name}
                </span>
                <button
                  type="button"
                  className={quietButtonClass}
                  aria-label={`Rename ${v.name}`}
                  onClick={() => {
                    setMessage(null)
                    setName(v.name)
                    setStep({ kind: 'renaming', view: v })
                  }}
                >
                  Rename
                </button>
                <button type="button" className={quietButtonClass} aria-label={`Delete ${v.name}`} onClick={() => setStep({ kind: 'confirm-delete', view: v })}>
                  Delete
                </button>
              </li>
            ))}
          </ul>
        </details>
      )}
      {step.kind === 'renaming' && (
        <form
          className="flex items-end gap-1"
          onSubmit={(e) => {
            e.preventDefault()
            void rename(step.view, false)
          }}
        >
          <label className="flex flex-col gap-1 text-xs font-medium text-ink-soft">
            New name for “{step.view.name}”
            <input autoFocus value={name} onChange={(e) => setName(e.target.value)} maxLength={60} className={`${inputClass} w-40`} />
          </label>
          <button type="submit" className={`${quietButtonClass} mb-0.5`} disabled={busy}>
            Rename
          </button>
          <button type="button" className={`${quietButtonClass} mb-0.5`} onClick={cancel}>
            Cancel
          </button>
        </form>
      )}
      {(step.kind === 'confirm-save' || step.kind === 'confirm-rename' || step.kind === 'confirm-delete') && (
        <div role="group" aria-label="Confirm" className="flex flex-wrap items-center gap-2 rounded-sm border border-line-strong bg-sunken px-2.5 py-1.5 text-sm">
          <span id="views-confirm">
            {step.kind === 'confirm-delete'
              ? `Delete the view “${step.view.name}”? Its filters are not kept anywhere else.`
              : `You already have a view named “${step.name}”. Replace it${step.kind === 'confirm-save' ? ' with the filters on screen' : ''}?`}
          </span>
          <button
            type="button"
            className={buttonClass}
            disabled={busy}
            aria-describedby="views-confirm"
            onClick={() => void (step.kind === 'confirm-delete' ? remove(step.view) : step.kind === 'confirm-save' ? save(true) : rename(step.view, true))}
          >
            {step.kind === 'confirm-delete' ? 'Delete' : 'Replace'}
          </button>
          <button type="button" autoFocus className={quietButtonClass} onClick={step.kind === 'confirm-delete' ? cancel : () => setStep(step.kind === 'confirm-save' ? { kind: 'naming' } : { kind: 'renaming', view: step.view })}>
            {step.kind === 'confirm-delete' ? 'Keep it' : 'Choose another name'}
          </button>
        </div>
      )}
      {message && (
        <span role={message.tone === 'error' ? 'alert' : 'status'} className={`mb-1.5 text-xs ${message.tone === 'error' ? 'text-late' : 'text-ink-soft'}`}>
          {message.text}
        </span>
      )}
    </div>
  )
}
