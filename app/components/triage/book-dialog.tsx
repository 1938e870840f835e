// Booking visits for the queue's selection: one visit per site, each with its usual technician and
// next working day filled in, both changeable; open visits the detectors are already on are shown
// (and those for the same work left out) before anything is booked.
import { useEffect, useRef, useState } from 'react'
import { Link } from 'react-router'
import type { BookingPlan, SitePlan } from '~/.server/repos/triage-booking'
import { Caution } from '~/components/caution'
import { buttonClass, inputClass, quietButtonClass } from '~/components/ui/page-header'
import { useJson } from '~/components/use-json'
import { weekday } from '~/domain/dates'
import { siteBooking } from '~/domain/visit-forms'
import { FetchError, fetchJson } from '~/utils/fetch-json'

const KINDS = [
  { value: 'test', label: 'Test (visual and functional)' },
  { value: 'inspection', label: 'Inspection (visual)' },
  { value: 'cleaning', label: 'Cleaning (visual and cleaning)' },
  { value: 'repair', label: 'Repair (visual and functional)' },
] as const
type Kind = (typeof KINDS)[number]['value']

const DAY_NAMES = ['Sunday', 'Monday', 'Tuesday', 'Wednesday', 'Thursday', 'Friday', 'Saturday']
const dayName = (date: string) => DAY_NAMES[weekday(date)]

interface Choice {
  day: string
  technician: string
}
export interface Booked {
  message: string
  visits: Array<{ visitId: number; siteId: number; scheduledOn: string }>
}

/** Why a day will be refused at the site, said before the server says it. */
function dayProblem(plan: SitePlan, day: string): string | null {
  if (!/^\d{4}-\d{2}-\d{2}$/.test(day)) return null
  if (plan.holidays[day]) return `${plan.holidays[day]}: not a working day in ${plan.region}.`
  const wd = weekday(day)
  if (wd === 0 || wd === 6) return `A ${dayName(day)}: not a working day.`
  return null
}

export function BookDialog({ ids, onClose, onBooked }: { ids: number[]; onClose: () => void; onBooked: (b: Booked) => void }) {
  const dialog = useRef<HTMLDialogElement>(null)
  const firstField = useRef<HTMLSelectElement>(null)
  const [kind, setKind] = useState<Kind>('test')
  // Only what the lead changed is kept; the rest reads the plan's suggestions.
  const [edits, setEdits] = useState<Record<number, Partial<Choice>>>({})
  const [busy, setBusy] = useState(false)
  const [error, setError] = useState<{ message: string; conflicts: Array<{ detectorId: number; visitId: number; task: string }> } | null>(null)
  const { data: plan, error: planError } = useJson<BookingPlan>(`/api/triage/booking?ids=${ids.join(',')}&kind=${kind}`, { revalidateOnFocus: false, keepPreviousData: true })

  useEffect(() => {
    const d = dialog.current
    if (d && !d.open) d.showModal()
  }, [])
  const choiceFor = (s: SitePlan): Choice => ({ day: s.suggestedDay, technician: s.usual ? String(s.usual.id) : '', ...edits[s.siteId] })
  const ready = !!plan
  useEffect(() => {
    if (ready) firstField.current?.focus()
  }, [ready])

  const blocked = new Set((plan?.sites ?? []).flatMap((s) => s.openVisits.filter((o) => o.sameWork).map((o) => o.detectorId)))
  const bookable = ids.filter((id) => !blocked.has(id))
  const sitesToBook = (plan?.sites ?? []).filter((s) => s.detectors.some((d) => !blocked.has(d.id)))
  const tags = new Map((plan?.sites ?? []).flatMap((s) => s.detectors.map((d) => [d.id, d.tag] as const)))

  async function submit(e?: React.FormEvent) {
    e?.preventDefault()
    if (!plan || busy || bookable.length === 0) return
    setError(null)
    const sites = []
    for (const s of sitesToBook) {
      const c = choiceFor(s)
      const parsed = siteBooking.safeParse({ siteId: s.siteId, scheduledOn: c.day, technicianId: c.technician ? Number(c.technician) : null })
      if (!parsed.success) return setError({ message: `${s.site}: ${parsed.error.issues[0].message}`, conflicts: [] })
      sites.push(parsed.data)
    }
    setBusy(true)
    try {
      const answer = await fetchJson<Booked>('/api/triage', { method: 'POST', json: { intent: 'schedule', kind, ids: bookable, sites } })
      onBooked(answer)
    } catch (err) {
      const conflicts = err instanceof FetchError ? ((err.body as { conflicts?: [] } | null)?.conflicts ?? []) : []
      setError({ message: err instanceof Error ? err.message : String(err), conflicts })
    } finally {
      setBusy(false)
    }
  }

  // Enter books from any field, a list included; on a button or link it stays that control's own.
  const onKeyDown = (e: React.KeyboardEvent) => {
    // The console's own keys (j, k, x, g …) belong to the list beneath, not to this form.
    e.stopPropagation()
    if (e.key !== 'Enter' || e.shiftKey || e.altKey || e.ctrlKey || e.metaKey) return
    if (e.target instanceof HTMLElement && e.target.closest('button, a[href], textarea')) return
    e.preventDefault()
    void submit()
  }

  const set = (siteId: number, patch: Partial<Choice>) => setEdits((prev) => ({ ...prev, [siteId]: { ...prev[siteId], ...patch } }))
  const visits = sitesToBook.length

  return (
    <dialog
      ref={dialog}
      aria-labelledby="book-h"
      // Esc closes the dialog natively (the browser may not let a page refuse it twice); follow it.
      onClose={onClose}
      onKeyDown={onKeyDown}
      className="m-auto max-h-[90dvh] w-[min(44rem,calc(100vw-1.5rem))] overflow-y-auto rounded-md border border-line-strong bg-panel p-0 text-ink shadow-2xl backdrop:bg-ink/30"
    >
      <form onSubmit={submit} className="space-y-4 p-4 text-sm sm:p-5">
        <div className="flex items-baseline justify-between gap-3">
          <h2 id="book-h" className="text-lg font-semibold">
            Book {visits > 1 ? `${visits} visits` : 'a visit'} for {ids.length} detector{ids.length === 1 ? '' : 's'}
          </h2>
          <button type="button" onClick={onClose} className="shrink-0 text-sm text-ink-soft underline touch:min-h-11">
            Close<span className="touch:hidden"> (Esc)</span>
          </button>
        </div>

        <label className="flex flex-col gap-1 text-xs font-medium text-ink-soft sm:max-w-xs">
          Work
          <select className={inputClass} value={kind} onChange={(e) => setKind(e.target.value as Kind)}>
            {KINDS.map((k) => (
              <option key={k.value} value={k.value}>
                {k.label}
              </option>
            ))}
          </select>
        </label>

        {planError && (
          <p role="alert" className="rounded-sm bg-late-soft px-3 py-2 text-late">
            Could not read the booking: {planError.message}
          </p>
        )}
        {!plan && !planError && <p className="text-ink-soft">Reading the sites, their usual technicians and open visits…</p>}

        {plan && (
          <ul className="space-y-3">
            {plan.sites.map((s) => {
              const c = choiceFor(s)
              const left = s.detectors.filter((d) => !blocked.has(d.id))
              const problem = dayProblem(s, c.day)
              return (
                <li key={s.siteId} aria-label={s.site} className="rounded-sm border border-line p-3">
                  <p className="font-medium">
                    {s.site} <span className="font-normal text-ink-soft">· {s.city}</span>
                  </p>
                  <p className="mt-0.5 text-xs text-ink-soft">
                    {s.detectors.map((d) => d.tag).join(', ')}
                    {left.length < s.detectors.length && ` · ${left.length === 0 ? 'none' : left.length} to book`}
                  </p>
                  {left.length > 0 && (
                    <div className="mt-2 grid gap-3 sm:grid-cols-2">
                      <label className="flex flex-col gap-1 text-xs font-medium text-ink-soft">
                        Technician
                        <select ref={s.siteId === sitesToBook[0]?.siteId ? firstField : undefined} className={inputClass} value={c.technician} onChange={(e) => set(s.siteId, { technician: e.target.value })}>
                          <option value="">Unassigned</option>
                          {plan.technicians.map((t) => (
                            <option key={t.id} value={t.id}>
                              {t.name}
                              {s.usual?.id === t.id ? ' (usual)' : ''}
                            </option>
                          ))}
                        </select>
                        <span className="font-normal">
                          {s.usual ? `Usual here: ${s.usual.name}, ${s.usual.visits} of the last ${s.usual.of} visits.` : 'No recent visits here by a current technician.'}
                        </span>
                      </label>
                      <label className="flex flex-col gap-1 text-xs font-medium text-ink-soft">
                        Day
                        <input type="date" className={inputClass} min={plan.today} value={c.day} onChange={(e) => set(s.siteId, { day: e.target.value })} aria-invalid={problem ? true : undefined} />
                        <span className={`font-normal ${problem ? 'text-late' : ''}`}>
                          {problem ??
                            (c.day === s.suggestedDay
                              ? `${dayName(c.day)}, the next working day${s.skipped.length ? ` (after ${s.skipped.map((k) => k.holiday).join(', ')})` : ''}.`
                              : `${dayName(c.day)}.`)}
                        </span>
                      </label>
                    </div>
                  )}
                  {s.openVisits.length > 0 && (
                    <div className="mt-2 rounded-sm bg-soon-soft px-3 py-2 text-xs">
                      <p className="font-medium">Already on an open visit</p>
                      <ul className="mt-1 space-y-0.5">
                        {s.openVisits.map((o) => (
                          <li key={`${o.visitId}-${o.detectorId}`}>
                            {o.tag}:{' '}
                            <Link to={`/visits/${o.visitId}`} className="underline">
                              visit {o.visitId}
                            </Link>{' '}
                            ({o.kind}, {o.status}, {o.scheduledOn}
                            {o.technician ? `, ${o.technician}` : ', unassigned'}){o.sameWork ? ' · same work: left out of this booking' : ''}
                          </li>
                        ))}
                      </ul>
                    </div>
                  )}
                </li>
              )
            })}
          </ul>
        )}

        {error && (
          <div role="alert" className="rounded-sm bg-late-soft px-3 py-2 text-late">
            {error.message}
            {error.conflicts.length > 0 && (
              <ul className="mt-1 list-disc pl-5">
                {error.conflicts.slice(0, 10).map((c) => (
                  <li key={`${c.detectorId}-${c.task}`}>
                    {tags.get(c.detectorId) ?? `Detector ${c.detectorId}`}: {c.task} already on{' '}
                    <Link to={`/visits/${c.visitId}`} className="underline">
                      visit {c.visitId}
                    </Link>
                  </li>
                ))}
              </ul>
            )}
          </div>
        )}

        <Caution />

        <div className="flex flex-wrap items-center gap-2">
          <button type="submit" className={`${buttonClass} touch:min-h-11`} disabled={!ready || busy || bookable.length === 0}>
            {busy ? 'Booking…' : bookable.length === 0 && plan ? 'Nothing left to book' : `Book ${visits > 1 ? `${visits} visits` : 'visit'}`}
          </button>
          <button type="button" className={`${quietButtonClass} touch:min-h-11`} onClick={onClose}>
            Cancel
          </button>
          <span className="text-xs text-ink-faint touch:hidden">Enter books · Esc closes</span>
        </div>
      </form>
    </dialog>
  )
}
