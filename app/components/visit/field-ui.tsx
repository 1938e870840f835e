// Controls sized for a phone on a roof: targets of at least 44 px, large type, state shown in words
// and a glyph as well as colour, so gloves, glare and colour blindness do not get in the way.
import { useState } from 'react'
import { useRevalidator } from 'react-router'
import type { VisitIntent } from '~/domain/visit-forms'
import { FetchError, fetchJson } from '~/utils/fetch-json'

export const bigButton =
  'inline-flex min-h-12 items-center justify-center rounded-md bg-accent px-4 py-2 text-base font-semibold text-accent-ink hover:bg-accent/90 disabled:cursor-not-allowed disabled:opacity-50'
export const bigQuietButton =
  'inline-flex min-h-12 items-center justify-center rounded-md border border-line-strong bg-panel px-4 py-2 text-base font-medium text-ink hover:bg-sunken disabled:cursor-not-allowed disabled:opacity-50'
export const bigInput =
  'min-h-12 w-full min-w-0 rounded-md border border-line-strong bg-panel px-3 py-2 text-lg text-ink placeholder:text-ink-faint focus:border-accent'
export const fieldLabel = 'flex flex-col gap-1 text-sm font-medium text-ink-soft'

/** A row of large buttons of which one (or none) is chosen; `aria-pressed` carries the choice. */
export function Choice<T extends string>({
  label,
  value,
  options,
  onChange,
}: {
  label: string
  value: T | undefined
  options: ReadonlyArray<{ value: T; label: string }>
  onChange: (v: T | undefined) => void
}) {
  return (
    <fieldset className="min-w-0">
      <legend className="mb-1 text-sm font-medium text-ink-soft">{label}</legend>
      <div className="grid auto-cols-fr grid-flow-col gap-2">
        {options.map((o) => {
          const on = value === o.value
          return (
            <button
              key={o.value}
              type="button"
              aria-pressed={on}
              onClick={() => onChange(on ? undefined : o.value)}
              className={`min-h-12 min-w-0 rounded-md border-2 px-1 py-2 font-semibold ${options.length > 2 ? 'text-[0.95rem] tracking-tight' : 'text-base'} ${
                on ? 'border-accent bg-accent text-accent-ink' : 'border-line-strong bg-panel text-ink hover:bg-sunken'
              }`}
            >
              {on && (
                <span aria-hidden="true" className="mr-1">
                  ✓
                </span>
              )}
              {o.label}
            </button>
          )
        })}
      </div>
    </fieldset>
  )
}

const YES_NO = [
  { value: 'yes', label: 'Yes' },
  { value: 'no', label: 'No' },
] as const

export function YesNo({ label, value, onChange }: { label: string; value: boolean | undefined; onChange: (v: boolean | undefined) => void }) {
  return (
    <Choice
      label={label}
      value={value === undefined ? undefined : value ? 'yes' : 'no'}
      options={YES_NO}
      onChange={(v) => onChange(v === undefined ? undefined : v === 'yes')}
    />
  )
}

export function Alert({ children, tone = 'error' }: { children: React.ReactNode; tone?: 'error' | 'ok' | 'warn' }) {
  const cls = { error: 'border-late/40 bg-late-soft text-late', ok: 'border-ok/40 bg-ok-soft text-ok', warn: 'border-soon/40 bg-soon-soft text-ink' }[tone]
  return (
    <p role={tone === 'ok' ? 'status' : 'alert'} className={`rounded-md border px-3 py-2 text-base ${cls}`}>
      <span aria-hidden="true" className="mr-1.5 font-mono font-semibold">
        {tone === 'ok' ? '✓' : '!'}
      </span>
      {children}
    </p>
  )
}

/** Sends one of the visit's intents, then reloads the page's data; keeps the server's message on refusal. */
export function useVisitIntent(visitId: number) {
  const revalidator = useRevalidator()
  const [busy, setBusy] = useState(false)
  const [error, setError] = useState<{ status: number; message: string; stale: boolean } | null>(null)
  async function send(body: VisitIntent, onDone?: () => void): Promise<boolean> {
    setBusy(true)
    setError(null)
    try {
      await fetchJson(`/api/visits/${visitId}`, { method: 'POST', json: body })
      onDone?.()
      await revalidator.revalidate()
      return true
    } catch (e) {
      // A stale version comes back as a 409 carrying the visit's current version.
      const stale = e instanceof FetchError && e.status === 409 && typeof (e.body as { version?: unknown } | null)?.version === 'number'
      setError(e instanceof FetchError ? { status: e.status, message: e.message, stale } : { status: 0, message: String(e), stale: false })
      return false
    } finally {
      setBusy(false)
    }
  }
  return { send, busy, error, clearError: () => setError(null) }
}
