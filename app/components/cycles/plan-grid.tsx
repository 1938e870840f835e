import { useState } from 'react'
import type { CycleVisit } from '~/.server/bulk/actions/cleaning-cycle'
import { inputClass, quietButtonClass } from '~/components/ui/page-header'

export type PlanVisit = CycleVisit
export interface PlanTechnician {
  id: number
  name: string
  regions: string[] | null
  dailyCapacity: number | null
  capacityUnit: string
}
export interface PlanExtra {
  dueBy: string
  notDue: number
  technicians: PlanTechnician[]
  visits: PlanVisit[]
  days: string[]
  load: Record<string, number>
  notes: string[]
}

/**
 * The proposed cycle as a table of days × technicians: each cell lists its sites with their detector
 * counts and the day's load against capacity; each visit can be taken out or moved.
 */
export function PlanGrid(p: { plan: PlanExtra; from: string; to: string; onRemove: (key: string) => void; onMove: (key: string, technicianId: number, date: string) => void }) {
  const { plan } = p
  const cell = (techId: number, date: string) => plan.visits.filter((v) => v.technicianId === techId && v.date === date)
  return (
    <section aria-label="Proposed visits" className="space-y-2">
      {plan.notes.map((n) => (
        <p key={n} role="alert" className="rounded-sm bg-late-soft px-3 py-2 text-sm text-late">
          {n}
        </p>
      ))}
      <div className="overflow-x-auto rounded-md border border-line">
        <table className="min-w-full border-collapse text-left text-xs">
          <caption className="sr-only">Proposed visits by day and technician</caption>
          <thead className="bg-sunken text-ink-soft">
            <tr>
              <th scope="col" className="sticky left-0 bg-sunken px-2 py-1.5 font-medium">
                Day
              </th>
              {plan.technicians.map((t) => (
                <th key={t.id} scope="col" className="min-w-44 px-2 py-1.5 font-medium">
                  {t.name}
                  <span className="block font-normal text-ink-faint">
                    {t.regions ? t.regions.join(', ') : 'every region'} · {t.dailyCapacity === null ? 'no daily limit' : `${t.dailyCapacity} ${t.capacityUnit} a day`}
                  </span>
                </th>
              ))}
            </tr>
          </thead>
          <tbody>
            {plan.days.map((date) => (
              <tr key={date} className="border-t border-line align-top">
                <th scope="row" className="sticky left-0 whitespace-nowrap bg-panel px-2 py-1.5 font-mono font-medium">
                  {date}
                </th>
                {plan.technicians.map((t) => {
                  const visits = cell(t.id, date)
                  const load = plan.load[`${t.id}|${date}`]
                  return (
                    <td key={t.id} className="px-2 py-1.5" data-cell={`${t.id}|${date}`}>
                      {visits.length > 0 && (
                        <p className="mb-1 text-ink-faint">
                          {load}
                          {t.dailyCapacity !== null && ` of ${t.dailyCapacity}`} {t.capacityUnit}
                        </p>
                      )}
                      <ul className="space-y-1">
                        {visits.map((v) => (
                          <VisitItem key={v.key} visit={v} plan={plan} from={p.from} to={p.to} onRemove={p.onRemove} onMove={p.onMove} />
                        ))}
                      </ul>
                    </td>
                  )
                })}
              </tr>
            ))}
          </tbody>
        </table>
      </div>
    </section>
  )
}

function VisitItem(p: { visit: PlanVisit; plan: PlanExtra; from: string; to: string; onRemove: (key: string) => void; onMove: (key: string, technicianId: number, date: string) => void }) {
  const v = p.visit
  const [moving, setMoving] = useState(false)
  const [tech, setTech] = useState(String(v.technicianId))
  const [date, setDate] = useState(v.date)
  const eligible = p.plan.technicians.filter((t) => !t.regions || t.regions.includes(v.region.toUpperCase()))
  return (
    <li className="rounded-sm border border-line bg-panel px-1.5 py-1" data-visit={v.key}>
      <span className="font-medium">{v.site}</span> · {v.detectors} detector{v.detectors === 1 ? '' : 's'}
      {v.moved && <span className="ml-1 text-accent">(moved)</span>}
      <span className="mt-1 flex gap-1">
        <button type="button" className={quietButtonClass} onClick={() => p.onRemove(v.key)} aria-label={`Remove the visit to ${v.site} on ${v.date}`}>
          Remove
        </button>
        <button type="button" className={quietButtonClass} onClick={() => setMoving(!moving)} aria-expanded={moving} aria-label={`Move the visit to ${v.site} on ${v.date}`}>
          Move…
        </button>
      </span>
      {moving && (
        <span className="mt-1 flex flex-col gap-1">
          <select aria-label="Technician" className={inputClass} value={tech} onChange={(e) => setTech(e.target.value)}>
            {eligible.map((t) => (
              <option key={t.id} value={t.id}>
                {t.name}
              </option>
            ))}
          </select>
          <input aria-label="Day" type="date" className={inputClass} min={p.from} max={p.to} value={date} onChange={(e) => setDate(e.target.value)} />
          <button
            type="button"
            className={quietButtonClass}
            onClick={() => {
              setMoving(false)
              p.onMove(v.key, Number(tech), date)
            }}
          >
            Move here
          </button>
        </span>
      )}
    </li>
  )
}
