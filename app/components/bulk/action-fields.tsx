import { Link } from 'react-router'
import { Caution } from '~/components/caution'
import { Field, inputClass } from '~/components/ui/page-header'
import { addDays } from '~/domain/dates'
import { DETECTOR_STATES } from '~/domain/vocabulary'

export interface Technician {
  id: number
  name: string
}

const STATE_LABEL = (s: string) => (s.charAt(0).toUpperCase() + s.slice(1)).replace(/-/g, ' ')

/** The starting values of an action's fields; `today` is the office's day, `technicians` the active ones. */
export function initialInput(action: string, today: string, technicians: readonly Technician[]): Record<string, unknown> {
  switch (action) {
    case 'delay-audit':
      return { do: 'correction-visits' }
    case 'cleaning-cycle':
      // Four weeks from tomorrow, cleaning due within 60 days, every active technician, as on the planner page.
      return {
        from: addDays(today, 1),
        to: addDays(today, 28),
        dueBy: addDays(today, 60),
        technicianIds: technicians.map((t) => t.id),
      }
    case 'reschedule':
      return { mode: 'shift', days: 2 }
    case 'set-state':
      return { state: 'out-of-service', reason: '' }
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
              <input
                type="number"
                className={`${inputClass} w-28`}
                value={String(v.days ?? '')}
                onChange={(e) =>
                  set({
                    days: e.target.value === '' ? '' : Number(e.target.value),
                  })
                }
              />
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
              <input
                className={`${inputClass} w-72`}
                value={String(v.reason ?? '')}
                onChange={(e) => set({ reason: e.target.value })}
                placeholder="Why the visits are called off"
              />
            </Field>
          )}
        </div>
      )
    }
    case 'set-state':
      return (
        <div className="flex flex-wrap items-end gap-3">
          <Field label="New state">
            <select autoFocus className={inputClass} value={String(v.state)} onChange={(e) => set({ state: e.target.value })}>
              {DETECTOR_STATES.map((s) => (
                <option key={s} value={s}>
                  {STATE_LABEL(s)}
                </option>
              ))}
            </select>
          </Field>
          {/* The wrapper bounds the field on a phone, where the row wraps. */}
          <div className="w-full min-w-0 sm:w-96">
            <Field label="Why (kept in each detector's history)">
              <input
                className={`${inputClass} w-full`}
                value={String(v.reason ?? '')}
                maxLength={300}
                onChange={(e) => set({ reason: e.target.value })}
                placeholder="Unit replaced; detector removed until the new one is in"
              />
            </Field>
          </div>
        </div>
      )
    case 'delay-audit':
      return (
        <div className="flex flex-col gap-3">
          <p className="text-sm text-ink-soft">
            The technician checks each module&apos;s delay setting per the device&apos;s instructions and coordinates any change with the monitoring company,
            after notifying it and site management. HVAC staff never alter the fire alarm panel.
          </p>
          <div className="flex flex-wrap items-end gap-3">
            <Field label="What to do">
              <select autoFocus className={`${inputClass} max-w-full`} value={String(v.do)} onChange={(e) => p.onChange({ do: e.target.value })}>
                <option value="correction-visits">Book correction visits (settings that disagree)</option>
                <option value="verify">Mark agreeing settings verified</option>
              </select>
            </Field>
            {v.do === 'correction-visits' && (
              <>
                <Field label="Day (blank: the first working day with room)">
                  <input type="date" className={inputClass} value={String(v.date ?? '')} onChange={(e) => set({ date: e.target.value || undefined })} />
                </Field>
                <Field label="Technician">
                  <select
                    className={inputClass}
                    value={v.technicianId == null ? '' : String(v.technicianId)}
                    onChange={(e) =>
                      set({
                        technicianId: e.target.value ? Number(e.target.value) : undefined,
                      })
                    }
                  >
                    <option value="">Usual technician, else one covering the region</option>
                    {p.technicians.map((t) => (
                      <option key={t.id} value={t.id}>
                        {t.name}
                      </option>
                    ))}
                  </select>
                </Field>
              </>
            )}
          </div>
        </div>
      )
    case 'cleaning-cycle': {
      const ids = (v.technicianIds as number[] | undefined) ?? []
      const flip = (id: number) =>
        set({
          technicianIds: ids.includes(id) ? ids.filter((x) => x !== id) : [...ids, id],
        })
      return (
        <div className="flex flex-col gap-3">
          <Caution compact />
          <div className="flex flex-wrap items-end gap-3">
            <Field label="First day">
              <input autoFocus type="date" className={inputClass} value={String(v.from ?? '')} onChange={(e) => set({ from: e.target.value })} />
            </Field>
            <Field label="Last day">
              <input type="date" className={inputClass} value={String(v.to ?? '')} onChange={(e) => set({ to: e.target.value })} />
            </Field>
            <Field label="Cleaning due by">
              <input type="date" className={inputClass} value={String(v.dueBy ?? '')} onChange={(e) => set({ dueBy: e.target.value })} />
            </Field>
          </div>
          <fieldset className="flex flex-wrap gap-x-4 gap-y-1 text-sm">
            <legend className="mb-1 text-xs font-medium text-ink-soft">Technicians</legend>
            {p.technicians.map((t) => (
              <label key={t.id} className="flex min-h-8 items-center gap-2">
                <input type="checkbox" className="size-4" checked={ids.includes(t.id)} onChange={() => flip(t.id)} />
                {t.name}
              </label>
            ))}
          </fieldset>
          <p className="text-xs text-ink-soft">
            One visit per site per day, most overdue first, each technician within their regions and daily capacity. To take visits out or move them by hand,
            plan on the{' '}
            <Link to="/cycles" className="underline">
              Cleaning cycles
            </Link>{' '}
            page.
          </p>
        </div>
      )
    }
    case 'assign':
      return techSelect(true, true)
    case 'note':
      return (
        <Field label="Note">
          <input
            autoFocus
            className={`${inputClass} w-96 max-w-full`}
            value={String(v.text ?? '')}
            onChange={(e) => set({ text: e.target.value })}
            placeholder="Added below each visit's notes"
          />
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
