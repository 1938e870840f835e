// The loop engine's answer as readings are typed: the server runs the same diagnosis the records use
// (POST /api/diagnose), asked again only once typing has rested, so the expected range sits beside
// each box and a miswire is named before anything is saved.
import { useEffect, useState } from 'react'
import type { DetectorState } from '~/domain/contacts'
import type { Arrangement, Diagnosis, Expected, Readings } from '~/domain/loop'
import { FetchError, fetchJson } from '~/utils/fetch-json'

const REST_MS = 350

export function useLoopDiagnosis(arrangement: Arrangement, readings: Readings) {
  const [answer, setAnswer] = useState<{ key: string; diagnosis: Diagnosis } | null>(null)
  const [error, setError] = useState<string | null>(null)
  const key = JSON.stringify({ arrangement, readings })
  useEffect(() => {
    const controller = new AbortController()
    const timer = setTimeout(() => {
      const body = JSON.parse(key) as { arrangement: Arrangement; readings: Readings }
      fetchJson<Diagnosis>('/api/diagnose', { method: 'POST', json: body, signal: controller.signal })
        .then((diagnosis) => {
          setAnswer({ key, diagnosis })
          setError(null)
        })
        .catch((e: unknown) => {
          if (controller.signal.aborted) return
          setError(e instanceof FetchError ? e.message : 'The diagnosis could not be reached.')
        })
    }, REST_MS)
    return () => {
      clearTimeout(timer)
      controller.abort()
    }
  }, [key])
  return { diagnosis: answer?.diagnosis ?? null, current: answer?.key === key, error }
}

const ohms = (n: number) => `${n.toLocaleString('en-US', { maximumFractionDigits: 1 })} Ω`

/** The expected reading for a state, in words short enough to sit beside its box. */
export function expectedWords(e: Expected | undefined): string {
  if (!e) return ''
  if ('open' in e) return 'Expect open'
  if (e.min === 0) return `Expect a short (≤ ${ohms(e.max)})`
  return `Expect ${ohms(e.min)}–${ohms(e.max)}`
}

const STATE_WORDS: Record<DetectorState, string> = { normal: 'Normal', alarm: 'Alarm', trouble: 'Trouble', unpowered: 'Power off' }

export function LoopVerdict({ diagnosis, current, error }: { diagnosis: Diagnosis | null; current: boolean; error: string | null }) {
  if (error) return <p className="rounded-md border border-line bg-sunken px-3 py-2 text-base">Diagnosis unavailable: {error}</p>
  if (!diagnosis) return <p className="text-base text-ink-faint">Working out the expected readings…</p>
  const { verdict, findings } = diagnosis
  const tone =
    verdict === 'pass'
      ? { cls: 'border-ok/40 bg-ok-soft', glyph: '✓', words: 'Loop reads as recorded' }
      : verdict === 'fail'
        ? { cls: 'border-late/40 bg-late-soft', glyph: '!', words: 'Loop does not read as recorded' }
        : { cls: 'border-line bg-sunken', glyph: '…', words: 'Enter the readings to check the loop' }
  return (
    <section aria-label="Loop diagnosis" aria-live="polite" className={`rounded-md border px-3 py-2 ${tone.cls} ${current ? '' : 'opacity-70'}`}>
      <p className="text-base font-semibold">
        <span aria-hidden="true" className="mr-1.5 font-mono">
          {tone.glyph}
        </span>
        {tone.words}
      </p>
      <p className="text-sm text-ink-soft">Wire on the loop ≈ {ohms(diagnosis.lineOhms)}</p>
      {findings.length > 0 && (
        <ul className="mt-1 list-disc space-y-1 pl-5 text-base">
          {findings.map((f, i) => (
            <li key={`${f.code}-${i}`} data-finding={f.code}>
              {f.state ? <span className="font-medium">{STATE_WORDS[f.state]}: </span> : null}
              {f.message}
            </li>
          ))}
        </ul>
      )}
      {verdict === 'fail' && (
        <p className="mt-1 text-sm text-ink-soft">
          Report it to the fire alarm contractor: HVAC staff do not alter the panel or the alarm wiring.
        </p>
      )}
    </section>
  )
}
