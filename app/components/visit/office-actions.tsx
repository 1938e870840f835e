// What the office and the lead change on a visit: its notes and kind, who does it, when, or calling it
// off (with a reason, which the site's history keeps). Each is a separate small form.
import { useState } from 'react'
import { VISIT_KINDS } from '~/domain/vocabulary'
import { Alert, bigButton, bigInput, fieldLabel, useVisitIntent } from './field-ui'

type Kind = (typeof VISIT_KINDS)[number]

function Panel({ title, children }: { title: string; children: React.ReactNode }) {
  return (
    <details className="group rounded-md border border-line bg-panel">
      <summary className="flex min-h-12 cursor-pointer items-center px-3 text-base font-medium select-none">
        <span aria-hidden="true" className="mr-2 font-mono text-ink-faint group-open:rotate-90">
          ›
        </span>
        {title}
      </summary>
      <div className="space-y-3 border-t border-line p-3">{children}</div>
    </details>
  )
}

export function OfficeActions({
  visitId,
  version,
  status,
  kind,
  notes,
  technicianId,
  technicians,
  scheduledOn,
  windowFrom,
  windowUntil,
}: {
  visitId: number
  version: number
  status: string
  kind: Kind
  notes: string | null
  technicianId: number | null
  technicians: Array<{ id: number; name: string; active: boolean }>
  scheduledOn: string
  windowFrom: string | null
  windowUntil: string | null
}) {
  const edit = useVisitIntent(visitId)
  const assign = useVisitIntent(visitId)
  const move = useVisitIntent(visitId)
  const cancel = useVisitIntent(visitId)
  const [k, setK] = useState<Kind>(kind)
  const [n, setN] = useState(notes ?? '')
  const [tech, setTech] = useState(technicianId === null ? '' : String(technicianId))
  const [day, setDay] = useState(scheduledOn)
  const [from, setFrom] = useState(windowFrom ?? '')
  const [until, setUntil] = useState(windowUntil ?? '')
  const [reason, setReason] = useState('')
  const open = status === 'planned' || status === 'notified' || status === 'in-progress'
  const cancellable = status === 'planned' || status === 'notified'

  return (
    <section aria-labelledby="office-h" className="space-y-2">
      <h2 id="office-h" className="text-lg font-semibold">
        Office
      </h2>
      <Panel title="Edit kind and notes">
        <form
          className="space-y-3"
          onSubmit={(e) => {
            e.preventDefault()
            void edit.send({ intent: 'edit', version, kind: k, notes: n })
          }}
        >
          <label className={fieldLabel}>
            Work
            <select className={bigInput} value={k} onChange={(e) => setK(e.target.value as Kind)}>
              {VISIT_KINDS.map((x) => (
                <option key={x} value={x}>
                  {x[0].toUpperCase() + x.slice(1)}
                </option>
              ))}
            </select>
          </label>
          <label className={fieldLabel}>
            Notes
            <textarea className={`${bigInput} min-h-20`} value={n} onChange={(e) => setN(e.target.value)} />
          </label>
          {edit.error && <Alert>{edit.error.message}</Alert>}
          <button className={bigButton} disabled={edit.busy}>
            Save changes
          </button>
        </form>
      </Panel>
      {open && (
        <Panel title="Reassign">
          <form
            className="space-y-3"
            onSubmit={(e) => {
              e.preventDefault()
              void assign.send({ intent: 'assign', version, technicianId: tech === '' ? null : Number(tech) })
            }}
          >
            <label className={fieldLabel}>
              Technician
              <select className={bigInput} value={tech} onChange={(e) => setTech(e.target.value)}>
                <option value="">Not assigned</option>
                {technicians.map((t) => (
                  <option key={t.id} value={t.id} disabled={!t.active && t.id !== technicianId}>
                    {t.active ? t.name : `${t.name} (left)`}
                  </option>
                ))}
              </select>
            </label>
            {assign.error && <Alert>{assign.error.message}</Alert>}
            <button className={bigButton} disabled={assign.busy}>
              Reassign
            </button>
          </form>
        </Panel>
      )}
      {cancellable && (
        <Panel title="Move to another day">
          <form
            className="space-y-3"
            onSubmit={(e) => {
              e.preventDefault()
              void move.send({ intent: 'reschedule', version, scheduledOn: day, windowFrom: from || undefined, windowUntil: until || undefined })
            }}
          >
            <label className={fieldLabel}>
              Day
              <input type="date" className={bigInput} value={day} onChange={(e) => setDay(e.target.value)} required />
            </label>
            <div className="grid grid-cols-2 gap-2">
              <label className={fieldLabel}>
                From
                <input type="time" className={bigInput} value={from} onChange={(e) => setFrom(e.target.value)} />
              </label>
              <label className={fieldLabel}>
                Until
                <input type="time" className={bigInput} value={until} onChange={(e) => setUntil(e.target.value)} />
              </label>
            </div>
            {move.error && <Alert>{move.error.message}</Alert>}
            <button className={bigButton} disabled={move.busy}>
              Move visit
            </button>
          </form>
        </Panel>
      )}
      {cancellable && (
        <Panel title="Cancel the visit">
          <form
            className="space-y-3"
            onSubmit={(e) => {
              e.preventDefault()
              void cancel.send({ intent: 'cancel', version, reason })
            }}
          >
            <label className={fieldLabel}>
              Reason (required)
              <textarea className={`${bigInput} min-h-20`} value={reason} onChange={(e) => setReason(e.target.value)} required />
            </label>
            {cancel.error && <Alert>{cancel.error.message}</Alert>}
            <button className={`${bigButton} bg-late hover:bg-late/90`} disabled={cancel.busy || !reason.trim()}>
              Cancel visit
            </button>
          </form>
        </Panel>
      )}
    </section>
  )
}
