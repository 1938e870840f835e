import { useState } from 'react'
import { useSearchParams } from 'react-router'
import useSWR from 'swr'
import { inputClass, quietButtonClass } from './ui/page-header'

interface View {
  id: number
  name: string
  query: string
}

const fetchJson = (url: string) => fetch(url).then((r) => r.json())

/** Named filter sets for a list page, per person. */
export function SavedViews({ page, query }: { page: string; query: string }) {
  const [, setParams] = useSearchParams()
  const { data, mutate } = useSWR<{ views: View[] }>(`/api/views?page=${page}`, fetchJson)
  const [naming, setNaming] = useState(false)
  const [name, setName] = useState('')
  const [message, setMessage] = useState<string | null>(null)
  const views = data?.views ?? []

  const save = async () => {
    const res = await fetch('/api/views', { method: 'POST', headers: { 'Content-Type': 'application/json' }, body: JSON.stringify({ intent: 'save', page, name, query }) })
    const body = await res.json()
    setMessage(res.ok ? `Saved “${name}”.` : (body.issues?.[0]?.message ?? body.error))
    if (res.ok) {
      setNaming(false)
      setName('')
      mutate()
    }
  }

  return (
    <div className="flex items-end gap-2">
      <label className="flex flex-col gap-1 text-xs font-medium text-ink-soft">
        Saved views
        <select
          className={inputClass}
          value=""
          onChange={(e) => {
            const view = views.find((v) => String(v.id) === e.target.value)
            if (view) setParams(new URLSearchParams(view.query), { replace: true })
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
      {naming ? (
        <form
          className="flex items-end gap-1"
          onSubmit={(e) => {
            e.preventDefault()
            void save()
          }}
        >
          <input autoFocus aria-label="View name" value={name} onChange={(e) => setName(e.target.value)} className={`${inputClass} w-40`} placeholder="Name this view" />
          <button type="submit" className={quietButtonClass}>
            Save
          </button>
        </form>
      ) : (
        <button type="button" className={`${quietButtonClass} mb-0.5`} onClick={() => setNaming(true)}>
          Save view…
        </button>
      )}
      {message && (
        <span role="status" className="mb-1.5 text-xs text-ink-soft">
          {message}
        </span>
      )}
    </div>
  )
}
