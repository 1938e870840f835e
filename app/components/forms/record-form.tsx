// The office's record forms: plain inputs posted as a form, checked in the browser with the same
// schema the server uses, so a mistake is shown beside its field before the round trip, and again
// (from the server) if the browser's check is skipped. Errors and cautions sit under their field.
import { createContext, useContext, useEffect, useId, useRef, useState } from 'react'
import { Form, Link, useNavigation, useRevalidator } from 'react-router'
import type { z } from 'zod'
import { fieldErrorsOf, type Caution } from '~/domain/record-forms'

type Values = Record<string, unknown>

interface FieldState {
  values: Values
  errors: Record<string, string>
  cautions: Record<string, string>
}

const FieldContext = createContext<FieldState>({ values: {}, errors: {}, cautions: {} })

/** What an edit action answers when it does not redirect. */
export type EditAnswer =
  | { status: 400; error: string; fieldErrors: Record<string, string> }
  | { status: 409; error: string; record: Values & { version: number }; savedBy: { name: string | null; at: string } | null }
  | { status: 404; error: string }

const inputBase =
  'min-h-11 w-full min-w-0 rounded-sm border bg-panel px-2.5 py-2 text-base text-ink placeholder:text-ink-faint focus:border-accent sm:min-h-9 sm:py-1.5 sm:text-sm'
const inputTone = (invalid: boolean) => (invalid ? 'border-late ring-1 ring-late/40' : 'border-line-strong')

function useField(name: string, hint?: string) {
  const { values, errors, cautions } = useContext(FieldContext)
  const id = useId()
  const error = errors[name]
  const caution = cautions[name]
  const value = values[name]
  return {
    id,
    error,
    caution,
    defaultValue: value === null || value === undefined ? '' : String(value),
    raw: value,
    described: [error && `${id}-error`, caution && `${id}-caution`, hint && `${id}-hint`].filter(Boolean).join(' ') || undefined,
  }
}

function Messages({ id, error, caution, hint }: { id: string; error?: string; caution?: string; hint?: string }) {
  return (
    <>
      {error && (
        <span id={`${id}-error`} className="flex gap-1 text-sm font-medium text-late">
          <span aria-hidden="true" className="font-mono">
            !
          </span>
          {error}
        </span>
      )}
      {hint && (
        <span id={`${id}-hint`} className="text-xs font-normal text-ink-faint">
          {hint}
        </span>
      )}
      {caution && (
        <span id={`${id}-caution`} className="flex gap-1.5 rounded-sm bg-soon-soft px-2 py-1 text-xs font-normal text-ink">
          <span aria-hidden="true" className="font-mono font-semibold text-soon">
            !
          </span>
          <span>
            <span className="font-semibold">Caution: </span>
            {caution}
          </span>
        </span>
      )}
    </>
  )
}

interface FieldProps {
  name: string
  label: string
  hint?: string
  /** Shown after the value and read with the label, e.g. "cfm". */
  unit?: string
  wide?: boolean
}

const labelClass = 'text-sm font-medium text-ink-soft'
const cell = (wide?: boolean) => `flex min-w-0 flex-col gap-1 ${wide ? 'sm:col-span-2' : ''}`

export function TextField({
  name,
  label,
  hint,
  unit,
  wide,
  mode,
  autoComplete,
  mono,
  list,
}: FieldProps & { mode?: 'numeric' | 'decimal' | 'email' | 'tel' | 'date' | 'text'; autoComplete?: string; mono?: boolean; list?: string }) {
  const f = useField(name, hint)
  const type = mode === 'email' || mode === 'tel' || mode === 'date' ? mode : 'text'
  return (
    <div className={cell(wide)}>
      <label htmlFor={f.id} className={labelClass}>
        {label}
        {unit && <span className="font-normal text-ink-faint"> ({unit})</span>}
      </label>
      <div className="flex items-stretch">
        <input
          id={f.id}
          name={name}
          type={type}
          list={list}
          inputMode={mode === 'numeric' || mode === 'decimal' ? mode : undefined}
          autoComplete={autoComplete ?? 'off'}
          spellCheck={mode ? false : undefined}
          defaultValue={f.defaultValue}
          aria-invalid={f.error ? true : undefined}
          aria-describedby={f.described}
          className={`${inputBase} ${inputTone(Boolean(f.error))} ${mono || mode === 'numeric' || mode === 'decimal' ? 'font-mono' : ''} ${unit ? 'rounded-r-none' : ''}`}
        />
        {unit && (
          <span aria-hidden="true" className="flex items-center rounded-r-sm border border-l-0 border-line-strong bg-sunken px-2 font-mono text-xs whitespace-nowrap text-ink-soft">
            {unit}
          </span>
        )}
      </div>
      <Messages id={f.id} error={f.error} caution={f.caution} hint={hint} />
    </div>
  )
}

export const NumberField = (p: FieldProps & { decimals?: boolean }) => <TextField {...p} mode={p.decimals ? 'decimal' : 'numeric'} />

export function TextAreaField({ name, label, hint, wide = true }: FieldProps) {
  const f = useField(name, hint)
  return (
    <div className={cell(wide)}>
      <label htmlFor={f.id} className={labelClass}>
        {label}
      </label>
      <textarea
        id={f.id}
        name={name}
        rows={3}
        defaultValue={f.defaultValue}
        aria-invalid={f.error ? true : undefined}
        aria-describedby={f.described}
        className={`${inputBase} ${inputTone(Boolean(f.error))}`}
      />
      <Messages id={f.id} error={f.error} caution={f.caution} hint={hint} />
    </div>
  )
}

export function SelectField({
  name,
  label,
  hint,
  wide,
  options,
  blank,
  onValue,
}: FieldProps & { options: ReadonlyArray<{ value: string | number; label: string }>; blank?: string; onValue?: (value: string) => void }) {
  const f = useField(name, hint)
  return (
    <div className={cell(wide)}>
      <label htmlFor={f.id} className={labelClass}>
        {label}
      </label>
      <select
        id={f.id}
        name={name}
        defaultValue={f.defaultValue}
        onChange={onValue && ((e) => onValue(e.currentTarget.value))}
        aria-invalid={f.error ? true : undefined}
        aria-describedby={f.described}
        className={`${inputBase} ${inputTone(Boolean(f.error))}`}
      >
        {blank !== undefined && <option value="">{blank}</option>}
        {options.map((o) => (
          <option key={o.value} value={o.value}>
            {o.label}
          </option>
        ))}
      </select>
      <Messages id={f.id} error={f.error} caution={f.caution} hint={hint} />
    </div>
  )
}

export function CheckField({ name, label, hint, wide }: FieldProps) {
  const f = useField(name, hint)
  return (
    <div className={cell(wide)}>
      {/* An unticked box posts nothing: the hidden "false" before it stands in, and a ticked box's later value wins. */}
      <input type="hidden" name={name} value="false" />
      <label htmlFor={f.id} className="flex min-h-11 cursor-pointer items-center gap-2.5 text-sm text-ink sm:min-h-9">
        <input
          id={f.id}
          name={name}
          type="checkbox"
          defaultChecked={f.raw === true}
          aria-describedby={f.described}
          className="size-5 accent-accent sm:size-4"
        />
        {label}
      </label>
      <Messages id={f.id} error={f.error} caution={f.caution} hint={hint} />
    </div>
  )
}

export function Section({ title, note, children }: { title: string; note?: string; children: React.ReactNode }) {
  return (
    <fieldset className="min-w-0 rounded-md border border-line bg-panel p-4">
      <legend className="px-1 font-semibold">{title}</legend>
      {note && <p className="mb-3 text-sm text-ink-soft">{note}</p>}
      <div className="grid gap-x-4 gap-y-4 sm:grid-cols-2">{children}</div>
    </fieldset>
  )
}

const valuesOf = (form: HTMLFormElement) => Object.fromEntries(new FormData(form)) as Values

/**
 * The edit form: posts to the page's action with the version it was opened on. Before posting it
 * runs the shared schema and, if anything is wrong, stays put with the messages under the fields and
 * the first wrong field focused. Ctrl/⌘ Enter saves from anywhere in the form.
 */
export function RecordForm({
  record,
  schema,
  cautions,
  answer,
  labels,
  cancelTo,
  what,
  children,
}: {
  record: Values & { version: number }
  schema: z.ZodType
  cautions?: (values: Values) => Caution[]
  answer: EditAnswer | undefined
  labels: Record<string, string>
  cancelTo: string
  what: string
  children: React.ReactNode
}) {
  const formRef = useRef<HTMLFormElement>(null)
  const navigation = useNavigation()
  const saving = navigation.state !== 'idle' && navigation.formMethod?.toUpperCase() === 'POST'
  const [errors, setErrors] = useState<Record<string, string>>({})
  const [live, setLive] = useState<Caution[]>(() => cautions?.(record) ?? [])
  const [focusFirst, setFocusFirst] = useState(0)
  const conflict = answer?.status === 409 && answer.record.version !== record.version ? answer : null
  const [mine, setMine] = useState<Values>({})

  // A refusal from the server replaces what the browser found (state adjusted while rendering, when the answer changes).
  const [seen, setSeen] = useState(answer)
  if (answer !== seen) {
    setSeen(answer)
    if (answer?.status === 400) {
      setErrors(answer.fieldErrors)
      setFocusFirst((n) => n + 1)
    }
  }

  useEffect(() => {
    if (focusFirst > 0) formRef.current?.querySelector<HTMLElement>('[aria-invalid="true"]')?.focus()
  }, [focusFirst])

  function check(form: HTMLFormElement): Record<string, string> {
    const parsed = schema.safeParse(valuesOf(form))
    return parsed.success ? {} : fieldErrorsOf(parsed.error)
  }

  function onSubmit(e: React.FormEvent<HTMLFormElement>) {
    // Kept to set beside the other person's values, should the save come too late.
    setMine(valuesOf(e.currentTarget))
    const found = check(e.currentTarget)
    setErrors(found)
    if (Object.keys(found).length > 0) {
      e.preventDefault()
      setFocusFirst((n) => n + 1)
    }
  }

  // A field's message is updated when the person leaves it; the others wait for the save.
  function onBlur(e: React.FocusEvent<HTMLFormElement>) {
    const name = e.target instanceof HTMLInputElement || e.target instanceof HTMLSelectElement || e.target instanceof HTMLTextAreaElement ? e.target.name : ''
    if (!name || !(name in labels)) return
    const found = check(e.currentTarget)
    setErrors((prev) => {
      const next = { ...prev }
      if (found[name]) next[name] = found[name]
      else delete next[name]
      return next
    })
  }

  function onChange(e: React.FormEvent<HTMLFormElement>) {
    if (cautions) setLive(cautions(valuesOf(e.currentTarget)))
  }

  function onKeyDown(e: React.KeyboardEvent<HTMLFormElement>) {
    if (e.key === 'Enter' && (e.ctrlKey || e.metaKey)) {
      e.preventDefault()
      e.currentTarget.requestSubmit()
    }
  }

  const unplaced = Object.entries(errors).filter(([k]) => !(k in labels))
  const count = Object.keys(errors).length
  return (
    <>
      {conflict && <ConflictPanel conflict={conflict} labels={labels} mine={mine} what={what} />}
      {count > 0 && (
        <div role="alert" className="mb-4 rounded-md border border-late/40 bg-late-soft px-3 py-2 text-sm text-late">
          <p className="font-semibold">
            {count === 1 ? 'One field needs' : `${count} fields need`} attention before this can be saved.
          </p>
          <ul className="mt-1 list-disc pl-5">
            {Object.entries(errors).map(([k, message]) => (
              <li key={k}>
                {labels[k] ?? k}: {message}
              </li>
            ))}
          </ul>
          {unplaced.length > 0 && <p className="mt-1">Nothing was saved.</p>}
        </div>
      )}
      {answer?.status === 404 && (
        <p role="alert" className="mb-4 rounded-md border border-late/40 bg-late-soft px-3 py-2 text-sm text-late">
          {answer.error}
        </p>
      )}
      <FieldContext.Provider value={{ values: record, errors, cautions: Object.fromEntries(live.map((c) => [c.field, c.message])) }}>
        <Form
          ref={formRef}
          method="post"
          noValidate
          onSubmit={onSubmit}
          onBlur={onBlur}
          onChange={onChange}
          onKeyDown={onKeyDown}
          aria-label={`Edit ${what}`}
          className="space-y-5"
        >
          <input type="hidden" name="version" value={record.version} />
          {children}
          <div className="flex flex-wrap items-center gap-3 pt-1">
            <button
              type="submit"
              disabled={saving || conflict !== null}
              className="min-h-11 rounded-sm bg-accent px-4 py-2 text-base font-medium text-accent-ink hover:bg-accent/90 disabled:opacity-50 sm:min-h-9 sm:text-sm"
            >
              {saving ? 'Saving…' : 'Save changes'}
            </button>
            <Link to={cancelTo} className="min-h-11 content-center rounded-sm px-3 text-base text-ink-soft underline decoration-line-strong underline-offset-2 hover:text-ink sm:min-h-9 sm:text-sm">
              Cancel
            </Link>
            <span className="ml-auto hidden text-xs text-ink-faint sm:inline touch:hidden">
              <kbd className="font-mono">Ctrl</kbd> <kbd className="font-mono">Enter</kbd> saves
            </span>
          </div>
        </Form>
      </FieldContext.Provider>
    </>
  )
}

const shown = (v: unknown) => (v === null || v === undefined || v === '' ? '—' : v === true || v === 'on' ? 'Yes' : v === false || v === 'false' ? 'No' : String(v))

function when(iso: string) {
  return new Intl.DateTimeFormat('en-GB', { day: 'numeric', month: 'short', hour: '2-digit', minute: '2-digit', hourCycle: 'h23' }).format(new Date(iso))
}

/** Someone saved in between: their values beside the ones in this form, and the way to take theirs. */
function ConflictPanel({
  conflict,
  labels,
  mine,
  what,
}: {
  conflict: Extract<EditAnswer, { status: 409 }>
  labels: Record<string, string>
  mine: Values
  what: string
}) {
  const revalidator = useRevalidator()
  const theirs = conflict.record
  // Compared as text, the way the form holds them.
  const rows = Object.keys(labels).filter((k) => k in theirs && shown(theirs[k]) !== shown(mine[k] ?? null))
  const ref = useRef<HTMLDivElement>(null)
  useEffect(() => ref.current?.focus(), [])
  return (
    <div ref={ref} tabIndex={-1} role="alert" className="mb-4 rounded-md border-2 border-late/60 bg-panel p-3 sm:p-4">
      <p className="font-semibold text-late">
        <span aria-hidden="true" className="mr-1.5 font-mono">
          !
        </span>
        Not saved: this {what} changed while you were editing.
      </p>
      <p className="mt-1 text-sm text-ink-soft">
        {conflict.savedBy ? `${conflict.savedBy.name ?? 'Someone'} saved it at ${when(conflict.savedBy.at)}.` : 'Someone else saved it.'} Your entries are still in
        the form below. Load the saved version, then make your change again on top of it.
      </p>
      {rows.length > 0 && (
        <div className="mt-3 overflow-x-auto">
          <table className="w-full text-sm">
            <thead className="text-left text-xs text-ink-faint uppercase">
              <tr>
                <th className="py-1 pr-3 font-medium">Field</th>
                <th className="py-1 pr-3 font-medium">Saved by them</th>
                <th className="py-1 font-medium">Yours, not saved</th>
              </tr>
            </thead>
            <tbody>
              {rows.map((k) => (
                <tr key={k} className="border-t border-line/70 align-top">
                  <th scope="row" className="py-1.5 pr-3 text-left font-medium">
                    {labels[k]}
                  </th>
                  <td className="py-1.5 pr-3 font-mono break-all">{shown(theirs[k])}</td>
                  <td className="py-1.5 font-mono break-all text-ink-soft">{shown(mine[k] ?? null)}</td>
                </tr>
              ))}
            </tbody>
          </table>
        </div>
      )}
      <button
        type="button"
        onClick={() => void revalidator.revalidate()}
        className="mt-3 min-h-11 rounded-sm bg-accent px-4 py-2 text-base font-medium text-accent-ink hover:bg-accent/90 sm:min-h-9 sm:text-sm"
      >
        Load the saved version
      </button>
    </div>
  )
}
