import { useEffect, useRef, useState } from 'react'
import { useSearchParams } from 'react-router'
import { useShortcut } from './keyboard'
import { inputClass } from './ui/page-header'

// Finger-sized on a phone, the desk's compact size from md up.
const control = `${inputClass} min-h-11 md:min-h-0`

export type FilterOption =
  | {
      kind?: 'select'
      param: string
      label: string
      /** What the empty choice means, when it is not "any". */
      anyLabel?: string
      options: Array<{ value: string; label: string }>
    }
  | { kind: 'date'; param: string; label: string }

/** The filters of a list page, kept in the URL so a view can be bookmarked and shared. */
// The URL as it is now, not as of the last render: a filter chosen just after typing must keep the
// text the search box has only just written.
const currentParams = (rendered: URLSearchParams) => new URLSearchParams(typeof window === 'undefined' ? rendered : window.location.search)

export function FilterBar({ placeholder, filters, children }: { placeholder: string; filters: FilterOption[]; children?: React.ReactNode }) {
  const [params, setParams] = useSearchParams()
  const urlText = params.get('q') ?? ''
  const [text, setText] = useState(urlText)
  const input = useRef<HTMLInputElement>(null)
  // The text this field last put in the URL. Any other change of `q` (a saved view, Back, a link)
  // comes from outside and replaces what the field shows; otherwise the field would write its old
  // text back over it.
  const written = useRef<string | null>(null)
  useShortcut('focus-filter', () => input.current?.focus())

  useEffect(() => {
    if (urlText === written.current) return
    written.current = urlText
    setText(urlText)
  }, [urlText])

  // Typing settles for a moment before the URL (and so the query) changes.
  useEffect(() => {
    const t = setTimeout(() => {
      if (urlText === text.trim()) return
      const next = currentParams(params)
      if (text.trim()) next.set('q', text.trim())
      else next.delete('q')
      written.current = text.trim()
      setParams(next, { replace: true })
    }, 250)
    return () => clearTimeout(t)
  }, [text, urlText, params, setParams])

  const set = (param: string, value: string) => {
    const next = currentParams(params)
    if (value) next.set(param, value)
    else next.delete(param)
    setParams(next, { replace: true })
  }
  const active = filters.filter((f) => params.get(f.param)).length + (params.get('q') ? 1 : 0)
  // On a phone the choices fold behind one button so the list starts on the first screen.
  const [unfolded, setUnfolded] = useState(false)
  const chosen = filters.filter((f) => params.get(f.param)).length

  return (
    <div role="search" className="mb-3 flex flex-wrap items-end gap-2">
      <label className="flex w-full flex-col gap-1 text-xs font-medium text-ink-soft sm:w-auto">
        Filter <span className="sr-only">(press / to focus)</span>
        <input
          ref={input}
          type="search"
          value={text}
          onChange={(e) => setText(e.target.value)}
          onKeyDown={(e) => {
            if (e.key === 'Escape') {
              e.preventDefault()
              e.currentTarget.blur()
            }
          }}
          placeholder={placeholder}
          aria-keyshortcuts="/"
          className={`${control} w-full sm:w-64`}
        />
      </label>
      {filters.length > 0 && (
        <button
          type="button"
          aria-expanded={unfolded}
          aria-controls="list-filters"
          onClick={() => setUnfolded(!unfolded)}
          className="min-h-11 rounded-sm border border-line-strong bg-panel px-3 text-sm text-ink md:hidden"
        >
          {unfolded ? 'Hide filters' : 'Filters'}
          {chosen > 0 && ` (${chosen} on)`}
        </button>
      )}
      {/* `contents` keeps each choice a direct item of the bar at desk width, in the same tab order. */}
      <div id="list-filters" className={`${unfolded ? 'flex w-full flex-wrap items-end gap-2' : 'hidden'} md:contents`}>
      {filters.map((f) =>
        f.kind === 'date' ? (
          <label key={f.param} className="flex flex-col gap-1 text-xs font-medium text-ink-soft">
            {f.label}
            <input
              type="date"
              value={params.get(f.param) ?? ''}
              onChange={(e) => set(f.param, e.target.value)}
              onKeyDown={(e) => {
                if (e.key === 'Escape') {
                  e.preventDefault()
                  e.currentTarget.blur()
                }
              }}
              className={control}
            />
          </label>
        ) : (
        <label key={f.param} className="flex flex-col gap-1 text-xs font-medium text-ink-soft">
          {f.label}
          <select
            value={params.get(f.param) ?? ''}
            onChange={(e) => set(f.param, e.target.value)}
            onKeyDown={(e) => {
              if (e.key === 'Escape') {
                e.preventDefault()
                e.currentTarget.blur()
              }
            }}
            className={control}
          >
            <option value="">{f.anyLabel ?? 'Any'}</option>
            {f.options.map((o) => (
              <option key={o.value} value={o.value}>
                {o.label}
              </option>
            ))}
          </select>
        </label>
        ),
      )}
      </div>
      {active > 0 && (
        <button
          type="button"
          onClick={() => {
            setText('')
            const next = new URLSearchParams()
            for (const k of ['sort', 'dir']) if (params.get(k)) next.set(k, params.get(k)!)
            setParams(next, { replace: true })
          }}
          className="mb-0.5 min-h-11 rounded-sm px-2 py-1.5 text-xs text-ink-soft underline hover:text-ink md:min-h-0"
        >
          Clear {active} filter{active === 1 ? '' : 's'}
        </button>
      )}
      {children}
    </div>
  )
}
