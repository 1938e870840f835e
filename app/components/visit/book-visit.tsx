// Booking a visit from a site, a unit or a detector: the office picks the work, the day and the tasks;
// the server refuses (409) a detector that already has an open visit for the same task, and the
// refusal links to that visit.
import { useState } from 'react'
import { Link, useNavigate } from 'react-router'
import { useRole } from '~/components/use-role'
import { buttonClass, inputClass, quietButtonClass } from '~/components/ui/page-header'
import { can } from '~/domain/permissions'
import { VISIT_KINDS, VISIT_TASKS, type VisitTask } from '~/domain/vocabulary'
import { newVisit } from '~/domain/visit-forms'
import { FetchError, fetchJson } from '~/utils/fetch-json'
import { taskWords } from './detector-entry-form'

type Kind = (typeof VISIT_KINDS)[number]
interface Conflict {
  detectorId: number
  visitId: number
  task: string
}

export function BookVisit({ siteId, detectors, what }: { siteId: number; detectors: Array<{ id: number; tag: string }>; what: string }) {
  const role = useRole()
  const navigate = useNavigate()
  const [open, setOpen] = useState(false)
  const [kind, setKind] = useState<Kind>('inspection')
  const [day, setDay] = useState('')
  const [from, setFrom] = useState('')
  const [until, setUntil] = useState('')
  const [tasks, setTasks] = useState<VisitTask[]>(['visual', 'functional'])
  const [busy, setBusy] = useState(false)
  const [error, setError] = useState<{ message: string; conflicts: Conflict[] } | null>(null)
  if (!role || !can(role, 'schedule:visits') || detectors.length === 0) return null
  const tags = new Map(detectors.map((d) => [d.id, d.tag]))

  async function submit(e: React.FormEvent) {
    e.preventDefault()
    setError(null)
    const body = newVisit.safeParse({
      siteId,
      kind,
      scheduledOn: day,
      windowFrom: from || undefined,
      windowUntil: until || undefined,
      detectors: detectors.map((d) => ({ detectorId: d.id, tasks })),
    })
    if (!body.success) return setError({ message: body.error.issues[0].message, conflicts: [] })
    setBusy(true)
    try {
      const { visitId } = await fetchJson<{ visitId: number }>('/api/visits', { method: 'POST', json: body.data })
      void navigate(`/visits/${visitId}`)
    } catch (err) {
      const conflicts = err instanceof FetchError ? ((err.body as { conflicts?: Conflict[] } | null)?.conflicts ?? []) : []
      setError({ message: err instanceof Error ? err.message : String(err), conflicts })
    } finally {
      setBusy(false)
    }
  }

  if (!open)
    return (
      <button type="button" className={buttonClass} onClick={() => setOpen(true)}>
        Book a visit
      </button>
    )
  return (
    <form onSubmit={submit} aria-label={`Book a visit for ${what}`} className="mt-3 space-y-3 rounded-md border border-line bg-panel p-4 text-sm">
      <p className="font-semibold">
        Book a visit for {what} ({detectors.length} {detectors.length === 1 ? 'detector' : 'detectors'})
      </p>
      <div className="flex flex-wrap gap-3">
        <label className="flex flex-col gap-1 text-xs font-medium text-ink-soft">
          Work
          <select className={inputClass} value={kind} onChange={(e) => setKind(e.target.value as Kind)}>
            {VISIT_KINDS.map((k) => (
              <option key={k} value={k}>
                {k[0].toUpperCase() + k.slice(1)}
              </option>
            ))}
          </select>
        </label>
        <label className="flex flex-col gap-1 text-xs font-medium text-ink-soft">
          Day
          <input type="date" className={inputClass} value={day} onChange={(e) => setDay(e.target.value)} required />
        </label>
        <label className="flex flex-col gap-1 text-xs font-medium text-ink-soft">
          From
          <input type="time" className={inputClass} value={from} onChange={(e) => setFrom(e.target.value)} />
        </label>
        <label className="flex flex-col gap-1 text-xs font-medium text-ink-soft">
          Until
          <input type="time" className={inputClass} value={until} onChange={(e) => setUntil(e.target.value)} />
        </label>
      </div>
      <fieldset>
        <legend className="text-xs font-medium text-ink-soft">Tasks on each detector</legend>
        <div className="mt-1 flex flex-wrap gap-x-4 gap-y-1">
          {VISIT_TASKS.map((t) => (
            <label key={t} className="flex min-h-8 items-center gap-1.5">
              <input type="checkbox" checked={tasks.includes(t)} onChange={(e) => setTasks(e.target.checked ? [...tasks, t] : tasks.filter((x) => x !== t))} />
              {taskWords(t)}
            </label>
          ))}
        </div>
      </fieldset>
      {error && (
        <div role="alert" className="rounded-sm bg-late-soft px-3 py-2 text-late">
          {error.message}
          {error.conflicts.length > 0 && (
            <ul className="mt-1 list-disc pl-5">
              {error.conflicts.slice(0, 10).map((c) => (
                <li key={`${c.detectorId}-${c.task}`}>
                  {tags.get(c.detectorId) ?? `Detector ${c.detectorId}`}: {taskWords(c.task)} already on{' '}
                  <Link to={`/visits/${c.visitId}`} className="underline">
                    visit {c.visitId}
                  </Link>
                </li>
              ))}
            </ul>
          )}
        </div>
      )}
      <div className="flex gap-2">
        <button className={buttonClass} disabled={busy || tasks.length === 0}>
          {busy ? 'Booking…' : 'Book visit'}
        </button>
        <button type="button" className={quietButtonClass} onClick={() => setOpen(false)}>
          Close
        </button>
      </div>
    </form>
  )
}
