import { Field, inputClass } from '~/components/ui/page-header'
import { DETECTOR_STATES } from '~/domain/vocabulary'

export interface Technician {
  id: number
  name: string
}

const STATE_LABEL = (s: string) => (s.charAt(0).toUpperCase() + s.slice(1)).replace(/-/g, ' ')

/** The starting values of an action's fields. */
export function initialInput(action: string): Record<string, unknown> {
  switch (action) {
    case 'reschedule':
      return { mode: 'shift', days: 2 }
    case 'set-state':
      return { state: 'out-of-service' }
    case 'assign':
      return { technicianId: null }
    case 'note':
      return { text: '' }
    default:
      return {}
  }
}

/**
 * The fields an action asks for, as sent in the request body. The first field takes the focus, so
 * the panel can be worked from the keyboard alone.
 */
export function ActionFields(p: { action: string; value: Record<string, unknown>; onChange: (v: Record<string, unknown>) => void; technicians: Technician[] }) {
  const v = p.value
  const set = (patch: Record<string, unknown>) => p.onChange({ ...v, ...patch })
  const techSelect = (allowNone: boolean, autoFocus = false) => (
    <Field label={allowNone ? 'Technician' : 'To technician'}>
      <select
        autoFocus={autoFocus}
        className={inputClass}
        value={v.technicianId == null ? '' : String(v.technicianId)}
        onChange={(e) => set({ technicianId: e.target.value ? Number(e.target.value) : null })}
      >
        <option value="">{allowNone ? 'Nobody (unassign)' : 'Choose…'}</option>
        {p.technicians.map((t) => (
          <option key={t.id} value={t.id}>
            {t.name}
          </option>
        ))}
      </select>
    </Field>
  )
  switch (p.action) {
    case 'reschedule': {
      const mode = String(v.mode)
      return (
        <div className="flex flex-wrap items-end gap-3">
          <Field label="Change">
            <select autoFocus className={inputClass} value={mode} onChange={(e) => p.onChange(modeDefaults(e.target.value))}>
              <option value="shift">Shift by working days</option>
              <option value="date">Move to a date</option>
              <option value="technician">Give to a technician</option>
              <option value="cancel">Cancel</option>
            </select>
          </Field>
          {mode === 'shift' && (
            <Field label="Working days (negative: earlier)">
              <input type="number" className={`${inputClass} w-28`} value={String(v.days ?? '')} onChange={(e) => set({ days: e.target.value === '' ? '' : Number(e.target.value) })} />
            </Field>
          )}
          {mode === 'date' && (
            <Field label="Date">
              <input type="date" className={inputClass} value={String(v.date ?? '')} onChange={(e) => set({ date: e.target.value })} />
            </Field>
          )}
          {mode === 'technician' && techSelect(false)}
          {mode === 'cancel' && (
            <Field label="Reason">
              <input className={`${inputClass} w-72`} value={String(v.reason ?? '')} onChange={(e) => set({ reason: e.target.value })} placeholder="Why the visits are called off" />
            </Field>
          )}
        </div>
      )
    }
    case 'set-state':
      return (
        <Field label="New state">
          <select autoFocus className={inputClass} value={String(v.state)} onChange={(e) => set({ state: e.target.value })}>
            {DETECTOR_STATES.map((s) => (
              <option key={s} value={s}>
                {STATE_LABEL(s)}
              </option>
            ))}
          </select>
        </Field>
      )
    case 'assign':
      return techSelect(true, true)
    case 'note':
      return (
        <Field label="Note">
          <input autoFocus className={`${inputClass} w-96 max-w-full`} value={String(v.text ?? '')} onChange={(e) => set({ text: e.target.value })} placeholder="Added below each visit's notes" />
        </Field>
      )
    default:
      return <p className="text-sm text-ink-soft">Nothing to choose: preview to see each record.</p>
  }
}

function modeDefaults(mode: string): Record<string, unknown> {
  if (mode === 'shift') return { mode, days: 2 }
  if (mode === 'date') return { mode, date: '' }
  if (mode === 'technician') return { mode, technicianId: null }
  return { mode, reason: '' }
}
