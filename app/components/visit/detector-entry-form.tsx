// The technician's form: one detector at a time in roof-walk order, built for a phone held in a
// gloved hand. Everything typed is kept on the phone first (drafts.ts); "Save" sends it with the
// visit's version, and a refusal never overwrites what is on the phone.
import { useRef, useState, useSyncExternalStore } from 'react'
import { useRevalidator } from 'react-router'
import { checkPressure } from '~/domain/airflow'
import { delayLimitCaution } from '~/domain/delay-audit'
import { fieldChecks } from '~/domain/field-checks'
import { DETECTOR_STATES, type DetectorState } from '~/domain/contacts'
import { diagnoseInterlock, type InterlockStyle } from '~/domain/interlock'
import type { Arrangement } from '~/domain/loop'
import { PhotoUpload } from '~/components/photo-upload'
import { StateBadge } from '~/components/state-badge'
import { clearDrafts, emptyDraft, hasResult, loopReadings, num, readDraft, toEntry, writeDraft, type Draft } from './drafts'
import { Alert, Choice, YesNo, bigButton, bigInput, bigQuietButton, fieldLabel, useVisitIntent } from './field-ui'
import { LoopVerdict, expectedWords, useLoopDiagnosis } from './live-diagnosis'

export interface FormDetector {
  id: number
  tag: string
  unit: string
  position: string
  tasks: string[]
  result: string
  resultReason: string | null
  arrangement: Arrangement
  shutdownInput: InterlockStyle
  testStation: 'none' | 'key' | 'magnet'
  headsFitted: number
  delaySeconds: number | null
  velocity: { min: number; max: number }
  pressure: { min: number; max: number }
}

const TASK_WORDS: Record<string, string> = {
  visual: 'Visual',
  functional: 'Functional test',
  sensitivity: 'Sensitivity',
  cleaning: 'Cleaning',
  shutdown: 'Unit shutdown',
  'test-station': 'Test station',
}
export const taskWords = (t: string) => TASK_WORDS[t] ?? t

const STATE_WORDS: Record<DetectorState, string> = { normal: 'Normal', alarm: 'Alarm', trouble: 'Trouble', unpowered: 'Power off' }

const noop = () => () => {}
/** True once the page runs in the browser: drafts live in localStorage, which the server cannot read. */
function useInBrowser() {
  return useSyncExternalStore(noop, () => true, () => false)
}

/** Roof-walk order: unit by unit, then supply before return, then tag. */
export function roofWalk<T extends { unit: string; position: string; tag: string }>(ds: T[]): T[] {
  return [...ds].sort((a, b) => a.unit.localeCompare(b.unit, 'en', { numeric: true }) || b.position.localeCompare(a.position) || a.tag.localeCompare(b.tag, 'en', { numeric: true }))
}

export function DetectorEntryForm({
  visitId,
  version,
  detectors,
  delayPolicySeconds,
}: {
  visitId: number
  version: number
  detectors: FormDetector[]
  delayPolicySeconds: number
}) {
  const inBrowser = useInBrowser()
  const [index, setIndex] = useState(0)
  const complete = useVisitIntent(visitId)
  const [completeProblem, setCompleteProblem] = useState<string | null>(null)
  // Blank means today; a later day is refused by the server with its reason.
  const [doneOn, setDoneOn] = useState('')
  const ordered = roofWalk(detectors)
  const d = ordered[Math.min(index, ordered.length - 1)]
  if (!d) return <p className="text-base text-ink-soft">No detectors on this visit.</p>

  async function completeVisit() {
    setCompleteProblem(null)
    const entries = []
    for (const det of ordered) {
      const draft = readDraft(visitId, det.id)
      if (!hasResult(draft)) continue
      const r = toEntry(det.id, draft)
      if ('error' in r) {
        setCompleteProblem(`${det.tag}: ${r.error}`)
        setIndex(ordered.indexOf(det))
        return
      }
      entries.push(r.entry)
    }
    await complete.send({ intent: 'complete', version, entries, ...(doneOn ? { doneOn } : {}) }, () => clearDrafts(visitId))
  }

  return (
    <div className="space-y-4">
      <nav aria-label="Detectors on this visit" className="flex items-center gap-2">
        <button type="button" className={`${bigQuietButton} shrink-0`} disabled={index === 0} onClick={() => setIndex(index - 1)}>
          ‹ Prev<span className="sr-only"> detector</span>
        </button>
        <label className="min-w-0 flex-1">
          <span className="sr-only">Detector</span>
          <select className={`${bigInput} text-base`} value={d.id} onChange={(e) => setIndex(ordered.findIndex((x) => x.id === Number(e.target.value)))}>
            {ordered.map((x, i) => (
              <option key={x.id} value={x.id}>
                {i + 1}/{ordered.length} · {x.tag}
                {x.result !== 'pending' ? ` · ${x.result === 'skipped' ? 'not tested' : x.result}` : ''}
              </option>
            ))}
          </select>
        </label>
        <button
          type="button"
          className={`${bigQuietButton} shrink-0`}
          disabled={index >= ordered.length - 1}
          onClick={() => setIndex(index + 1)}
        >
          Next<span className="sr-only"> detector</span> ›
        </button>
      </nav>
      {inBrowser ? (
        <DetectorCard key={d.id} visitId={visitId} version={version} d={d} delayPolicySeconds={delayPolicySeconds} />
      ) : (
        <p className="text-base text-ink-faint">Loading the form…</p>
      )}
      <div className="space-y-2 border-t border-line pt-4">
        {completeProblem && <Alert>{completeProblem}</Alert>}
        {complete.error && (
          <Alert>
            {complete.error.stale ? 'Changed on another device — reload to see it; your entries are kept on this phone.' : complete.error.message}
          </Alert>
        )}
        <label className="block text-sm font-medium">
          Work done on
          <input type="date" className={`${bigInput} mt-1 block`} value={doneOn} onChange={(e) => setDoneOn(e.target.value)} aria-describedby="done-on-hint" />
          <span id="done-on-hint" className="mt-1 block text-sm font-normal text-ink-soft">
            Leave blank for today. Only when writing up work done on an earlier day.
          </span>
        </label>
        <button type="button" className={`${bigButton} w-full`} disabled={complete.busy} onClick={completeVisit}>
          {complete.busy ? 'Completing…' : 'Complete visit'}
        </button>
        <p className="text-sm text-ink-soft">Sends every detector with a result and finishes the visit. Log the all-clear once the system is out of test.</p>
      </div>
    </div>
  )
}

function DetectorCard({ visitId, version, d, delayPolicySeconds }: { visitId: number; version: number; d: FormDetector; delayPolicySeconds: number }) {
  const [draft, setDraft] = useState<Draft>(() => readDraft(visitId, d.id) ?? emptyDraft())
  const [saved, setSaved] = useState(false)
  const [problem, setProblem] = useState<{ message: string; field?: string } | null>(null)
  const readByBox = useRef<HTMLInputElement>(null)
  const save = useVisitIntent(visitId)
  const revalidator = useRevalidator()
  const update = (patch: Partial<Draft>) => {
    const next = { ...draft, ...patch }
    setDraft(next)
    setSaved(false)
    writeDraft(visitId, d.id, next)
  }
  const setLoop = (s: DetectorState, value: string) => update({ loop: { ...draft.loop, [s]: value } })
  const setOpen = (s: DetectorState, open: boolean) => update({ loopOpen: { ...draft.loopOpen, [s]: open } })

  const loop = useLoopDiagnosis(d.arrangement, loopReadings(draft))
  const interlock = diagnoseInterlock({
    style: d.shutdownInput,
    measured: { normalVolts: num(draft.inputNormal), alarmVolts: num(draft.inputAlarm), unitStopped: draft.unitShutDown, detectorTripped: draft.detectorTripped },
  })
  const pressure = num(draft.pressure)
  const pressureCheck = pressure === undefined ? null : checkPressure({ measuredInWc: pressure, listedMinInWc: d.pressure.min, listedMaxInWc: d.pressure.max })
  const velocity = num(draft.velocity)
  const delay = num(draft.delay)
  const headCount = num(draft.heads) ?? d.headsFitted
  const setHead = (head: number, patch: { tripped?: boolean; cleaned?: boolean }) =>
    update({ perHead: { ...draft.perHead, [head]: { ...draft.perHead?.[head], ...patch } } })
  // The same checks the server makes on saving; shown once the functional test is under way.
  const checks =
    draft.signalAtPanel === undefined && draft.unitShutDown === undefined
      ? []
      : fieldChecks({
          testStation: d.testStation,
          headsFitted: headCount,
          notTested: draft.result === 'not-tested',
          functionalRecorded: true,
          testStationWorked: draft.testStationWorked,
          testStationReset: draft.testStationReset,
          heads: Object.entries(draft.perHead ?? {}).map(([head, h]) => ({ head: Number(head), ...h })),
        }).filter((c) => !c.field.endsWith('cleaned'))
  const delayCaution = delayLimitCaution({ policySeconds: delayPolicySeconds, delaySeconds: delay ?? d.delaySeconds })

  async function onSave() {
    setProblem(null)
    const r = toEntry(d.id, draft)
    if ('error' in r) {
      setProblem({ message: r.error, field: r.field })
      // The box the problem belongs to may be far up the card on a phone: take the technician to it.
      if (r.field === 'loopReadBy') readByBox.current?.focus()
      return
    }
    if (await save.send({ intent: 'record', version, entries: [r.entry] })) setSaved(true)
  }

  return (
    <article aria-labelledby={`det-${d.id}`} className="space-y-5 rounded-md border border-line bg-panel p-3 text-base sm:p-4">
      <header>
        <h3 id={`det-${d.id}`} className="text-xl font-semibold">
          <span className="font-mono">{d.tag}</span>
        </h3>
        <p className="text-ink-soft">
          Unit <span className="font-mono">{d.unit}</span> · {d.position === 'supply' ? 'Supply' : 'Return'} duct
        </p>
        <p className="mt-1 flex flex-wrap gap-1.5">
          {d.tasks.map((t) => (
            <span key={t} className="rounded-sm bg-sunken px-2 py-0.5 text-sm">
              {taskWords(t)}
            </span>
          ))}
          {d.result !== 'pending' && <StateBadge value={d.result === 'skipped' ? 'unknown' : d.result} label={`Saved: ${d.result === 'skipped' ? 'not tested' : d.result}`} />}
        </p>
      </header>

      <section aria-labelledby={`fn-${d.id}`} className="space-y-3">
        <h4 id={`fn-${d.id}`} className="text-lg font-semibold">
          Functional test
        </h4>
        <YesNo label="Detector went into alarm (its alarm LED lit)" value={draft.detectorTripped} onChange={(v) => update({ detectorTripped: v })} />
        <Choice
          label="Signal at the panel"
          value={draft.signalAtPanel}
          options={[
            { value: 'alarm', label: 'Alarm' },
            { value: 'supervisory', label: 'Supervisory' },
            { value: 'nothing', label: 'Nothing' },
          ]}
          onChange={(v) => update({ signalAtPanel: v })}
        />
        <YesNo label="Unit shut down" value={draft.unitShutDown} onChange={(v) => update({ unitShutDown: v })} />
        <YesNo label="Reset OK" value={draft.resetOk} onChange={(v) => update({ resetOk: v })} />
        {headCount >= 2 &&
          Array.from({ length: headCount }, (_, n) => (
            <YesNo key={n} label={`Head ${n + 1} tested on its own put the module into alarm`} value={draft.perHead?.[n + 1]?.tripped} onChange={(v) => setHead(n + 1, { tripped: v })} />
          ))}
        {d.testStation !== 'none' && (
          <>
            <YesNo label={`Remote test station (${d.testStation}) tripped the detector`} value={draft.testStationWorked} onChange={(v) => update({ testStationWorked: v })} />
            {draft.testStationWorked === true && <YesNo label="The station reset it" value={draft.testStationReset} onChange={(v) => update({ testStationReset: v })} />}
          </>
        )}
        {checks.map((c) =>
          c.missing ? (
            <p key={c.field} className="text-sm text-ink-soft">
              {c.message}
            </p>
          ) : (
            <Alert key={c.field} tone="warn">
              {c.message}
            </Alert>
          ),
        )}
      </section>

      <section aria-labelledby={`loop-${d.id}`} className="space-y-3">
        <h4 id={`loop-${d.id}`} className="text-lg font-semibold">
          Loop readings at the panel pair
        </h4>
        <p className="text-sm text-ink-soft">
          Taken at the panel by the fire alarm contractor, or with them: they own the panel and the alarm wiring. Enter what they read; never open the panel or disconnect alarm wiring yourself.
        </p>
        {DETECTOR_STATES.map((s) => (
          <div key={s} className="grid grid-cols-[minmax(0,1fr)_auto] items-end gap-2">
            <label className={fieldLabel}>
              <span>
                {STATE_WORDS[s]} <span className="font-normal text-ink-faint">(Ω)</span>
              </span>
              <input
                className={bigInput}
                inputMode="decimal"
                autoComplete="off"
                disabled={draft.loopOpen[s]}
                value={draft.loopOpen[s] ? '' : (draft.loop[s] ?? '')}
                placeholder={draft.loopOpen[s] ? 'Open' : ''}
                onChange={(e) => setLoop(s, e.target.value)}
                aria-describedby={`exp-${d.id}-${s}`}
              />
              <span id={`exp-${d.id}-${s}`} className="min-h-5 text-sm font-normal text-ink-soft" data-expected={s}>
                {loop.diagnosis ? expectedWords(loop.diagnosis.expected[s]) : ' '}
              </span>
            </label>
            <button
              type="button"
              aria-pressed={Boolean(draft.loopOpen[s])}
              aria-label={`${STATE_WORDS[s]} reads open`}
              onClick={() => setOpen(s, !draft.loopOpen[s])}
              className={`mb-6 min-h-12 min-w-20 rounded-md border-2 px-3 text-base font-semibold ${draft.loopOpen[s] ? 'border-accent bg-accent text-accent-ink' : 'border-line-strong bg-panel'}`}
            >
              Open
            </button>
          </div>
        ))}
        <label className={fieldLabel}>
          Read at the panel by (fire alarm contractor, name and firm)
          <input
            ref={readByBox}
            className={`${bigInput} aria-invalid:border-2 aria-invalid:border-late`}
            autoComplete="off"
            maxLength={120}
            value={draft.loopReadBy ?? ''}
            onChange={(e) => update({ loopReadBy: e.target.value })}
            aria-invalid={problem?.field === 'loopReadBy' ? true : undefined}
            aria-describedby={`readby-${d.id}`}
          />
          <span id={`readby-${d.id}`} className={`text-sm ${problem?.field === 'loopReadBy' ? 'font-semibold text-late' : 'font-normal text-ink-soft'}`} data-field-error={problem?.field === 'loopReadBy' ? 'loopReadBy' : undefined}>
            {problem?.field === 'loopReadBy' ? problem.message : 'Required with any loop reading: the person who isolated the pair and read the meter.'}
          </span>
        </label>
        <LoopVerdict {...loop} />
      </section>

      <section aria-labelledby={`sd-${d.id}`} className="space-y-3">
        <h4 id={`sd-${d.id}`} className="text-lg font-semibold">
          Unit shutdown input <span className="text-base font-normal text-ink-soft">({d.shutdownInput})</span>
        </h4>
        <div className="grid grid-cols-2 gap-2">
          <label className={fieldLabel}>
            Volts AC, normal
            <input className={bigInput} inputMode="decimal" value={draft.inputNormal ?? ''} onChange={(e) => update({ inputNormal: e.target.value })} />
          </label>
          <label className={fieldLabel}>
            Volts AC, alarm
            <input className={bigInput} inputMode="decimal" value={draft.inputAlarm ?? ''} onChange={(e) => update({ inputAlarm: e.target.value })} />
          </label>
        </div>
        {interlock.verdict !== 'incomplete' || interlock.findings.length > 0 ? (
          <div className={`rounded-md border px-3 py-2 ${interlock.verdict === 'pass' ? 'border-ok/40 bg-ok-soft' : interlock.verdict === 'fail' ? 'border-late/40 bg-late-soft' : 'border-line bg-sunken'}`}>
            <p className="font-semibold">
              <span aria-hidden="true" className="mr-1.5 font-mono">
                {interlock.verdict === 'pass' ? '✓' : interlock.verdict === 'fail' ? '!' : '…'}
              </span>
              {interlock.verdict === 'pass' ? 'Shutdown input reads right' : interlock.verdict === 'fail' ? 'Shutdown input does not read right' : 'Shutdown input: check again'}
            </p>
            {interlock.findings.map((f) => (
              <p key={f.code} className="mt-1">
                {f.message}
              </p>
            ))}
          </div>
        ) : null}
      </section>

      <section aria-labelledby={`air-${d.id}`} className="space-y-3">
        <h4 id={`air-${d.id}`} className="text-lg font-semibold">
          Airflow against the listing
        </h4>
        <label className={fieldLabel}>
          Pressure difference (in. w.c.)
          <input className={bigInput} inputMode="decimal" value={draft.pressure ?? ''} onChange={(e) => update({ pressure: e.target.value })} />
          <span className="text-sm font-normal text-ink-soft">
            Listed {d.pressure.min}–{d.pressure.max} in. w.c.
          </span>
        </label>
        {pressureCheck && pressureCheck.status !== 'in-range' && <Alert tone="warn">{pressureCheck.message}</Alert>}
        <label className={fieldLabel}>
          Duct velocity (ft/min)
          <input className={bigInput} inputMode="numeric" value={draft.velocity ?? ''} onChange={(e) => update({ velocity: e.target.value })} />
          <span className="text-sm font-normal text-ink-soft">
            Listed {d.velocity.min.toLocaleString('en-US')}–{d.velocity.max.toLocaleString('en-US')} ft/min
          </span>
        </label>
        {velocity !== undefined && (velocity < d.velocity.min || velocity > d.velocity.max) && (
          <Alert tone="warn">
            {velocity.toLocaleString('en-US')} ft/min is {velocity < d.velocity.min ? 'below' : 'above'} the listed range: the detector may not sample the duct reliably.
          </Alert>
        )}
      </section>

      <section aria-labelledby={`more-${d.id}`} className="space-y-3">
        <h4 id={`more-${d.id}`} className="text-lg font-semibold">
          Delay, cleaning, heads
        </h4>
        <label className={fieldLabel}>
          Delay as found (seconds)
          <input className={bigInput} inputMode="numeric" value={draft.delay ?? ''} onChange={(e) => update({ delay: e.target.value })} />
          <span className="text-sm font-normal text-ink-soft">
            Site policy: {delayPolicySeconds === 0 ? 'no delay' : `${delayPolicySeconds} s`}
            {d.delaySeconds !== null && ` · on record: ${d.delaySeconds} s`}
            {delay !== undefined && (delay === delayPolicySeconds ? ' · agrees' : ' · does not agree with the policy')}
          </span>
        </label>
        {delayCaution && <Alert tone="warn">{delayCaution}</Alert>}
        {headCount >= 2 ? (
          Array.from({ length: headCount }, (_, n) => (
            <YesNo key={n} label={`Head ${n + 1} cleaned`} value={draft.perHead?.[n + 1]?.cleaned} onChange={(v) => setHead(n + 1, { cleaned: v })} />
          ))
        ) : (
          <YesNo label="Cleaned" value={draft.cleaned} onChange={(v) => update({ cleaned: v })} />
        )}
        <label className={fieldLabel}>
          Sampling heads fitted
          <input className={bigInput} inputMode="numeric" value={draft.heads ?? ''} placeholder={String(d.headsFitted)} onChange={(e) => update({ heads: e.target.value })} />
        </label>
        <label className={fieldLabel}>
          Notes
          <textarea className={`${bigInput} min-h-24`} value={draft.notes ?? ''} onChange={(e) => update({ notes: e.target.value })} />
        </label>
      </section>

      <section aria-labelledby={`photo-${d.id}`} className="space-y-2">
        <h4 id={`photo-${d.id}`} className="text-lg font-semibold">
          Photos of {d.tag}
        </h4>
        <PhotoUpload visitId={visitId} detectorId={d.id} detectorTag={d.tag} onUploaded={() => void revalidator.revalidate()} />
      </section>

      <section aria-labelledby={`res-${d.id}`} className="space-y-3">
        <h4 id={`res-${d.id}`} className="text-lg font-semibold">
          Result
        </h4>
        <Choice
          label="This detector"
          value={draft.result}
          options={[
            { value: 'pass', label: 'Pass' },
            { value: 'fail', label: 'Fail' },
            { value: 'not-tested', label: 'Not tested' },
          ]}
          onChange={(v) => update({ result: v })}
        />
        {draft.result && draft.result !== 'pass' && (
          <label className={fieldLabel}>
            {draft.result === 'fail' ? 'Why it failed (required)' : 'Why it was not tested (required)'}
            <textarea className={`${bigInput} min-h-20`} value={draft.reason ?? ''} onChange={(e) => update({ reason: e.target.value })} />
          </label>
        )}
        {problem && <Alert>{problem.message}</Alert>}
        {save.error &&
          (save.error.stale ? (
            <Alert>Changed on another device — reload to see it; your entries are kept on this phone.</Alert>
          ) : (
            <Alert>{save.error.message}</Alert>
          ))}
        {saved && !save.error && <Alert tone="ok">Saved {d.tag}.</Alert>}
        <button type="button" className={`${bigButton} w-full`} disabled={save.busy} onClick={onSave}>
          {save.busy ? 'Saving…' : `Save ${d.tag}`}
        </button>
        <p className="text-sm text-ink-soft">Entries stay on this phone as you type, until the visit is completed.</p>
      </section>
    </article>
  )
}
