// The notice before work (the monitoring company told and the system placed in test) and the
// all-clear after it. Work cannot start until a notice is logged: the page says why, and the server
// refuses too.
import { useState } from 'react'
import { NOTIFY_METHODS } from '~/domain/vocabulary'
import { Alert, Choice, YesNo, bigButton, bigInput, fieldLabel, useVisitIntent } from './field-ui'
import { fromLocalInput, toLocalInput } from './site-time'

const METHOD_WORDS = { phone: 'Phone', email: 'E-mail', portal: 'Portal' } as const
type Method = (typeof NOTIFY_METHODS)[number]

const FOUR_HOURS_MS = 4 * 60 * 60 * 1000

export function NoticeForm({
  visitId,
  version,
  preferred,
  timeZone,
  now,
}: {
  visitId: number
  version: number
  preferred: Method | null
  timeZone: string
  now: string
}) {
  const intent = useVisitIntent(visitId)
  const [method, setMethod] = useState<Method | undefined>(preferred ?? undefined)
  const [spokeWith, setSpokeWith] = useState('')
  const [confirmation, setConfirmation] = useState('')
  const [from, setFrom] = useState(() => toLocalInput(now, timeZone))
  const [until, setUntil] = useState(() => toLocalInput(new Date(Date.parse(now) + FOUR_HOURS_MS).toISOString(), timeZone))
  const [told, setTold] = useState<boolean | undefined>(undefined)
  const [siteContact, setSiteContact] = useState('')
  const [problem, setProblem] = useState<string | null>(null)
  // The preferred way first: the company asked to hear that way.
  const methods = [...NOTIFY_METHODS].sort((a, b) => Number(b === preferred) - Number(a === preferred)).map((m) => ({ value: m, label: METHOD_WORDS[m] + (m === preferred ? ' ★' : '') }))

  async function submit(e: React.FormEvent) {
    e.preventDefault()
    setProblem(null)
    const inTestFrom = fromLocalInput(from, timeZone)
    const inTestUntil = fromLocalInput(until, timeZone)
    if (!method) return setProblem('Choose how the monitoring company was told.')
    if (!spokeWith.trim()) return setProblem('Say who you spoke with.')
    if (!inTestFrom || !inTestUntil) return setProblem('Give the test window, from and until.')
    if (inTestUntil <= inTestFrom) return setProblem('The test window must end after it starts.')
    if (told === undefined) return setProblem('Say whether site management was told.')
    await intent.send({
      intent: 'notify',
      version,
      method,
      spokeWith: spokeWith.trim(),
      confirmation: confirmation.trim() || undefined,
      inTestFrom,
      inTestUntil,
      siteManagementTold: told,
      siteContact: siteContact.trim() || undefined,
    })
  }

  return (
    <form onSubmit={submit} aria-labelledby="notice-h" className="space-y-4 rounded-md border border-line bg-panel p-3 sm:p-4">
      <h2 id="notice-h" className="text-lg font-semibold">
        Log the notice
      </h2>
      <Choice label="How they were told (★ the way they prefer)" value={method} options={methods} onChange={setMethod} />
      <label className={fieldLabel}>
        Spoke with
        <input className={bigInput} value={spokeWith} onChange={(e) => setSpokeWith(e.target.value)} autoComplete="off" />
      </label>
      <label className={fieldLabel}>
        Confirmation number
        <input className={bigInput} value={confirmation} onChange={(e) => setConfirmation(e.target.value)} autoComplete="off" />
      </label>
      <div className="grid gap-3 sm:grid-cols-2">
        <label className={fieldLabel}>
          In test from
          <input type="datetime-local" className={bigInput} value={from} onChange={(e) => setFrom(e.target.value)} />
        </label>
        <label className={fieldLabel}>
          In test until
          <input type="datetime-local" className={bigInput} value={until} onChange={(e) => setUntil(e.target.value)} />
        </label>
      </div>
      <p className="-mt-2 text-sm text-ink-soft">Site time ({timeZone.replace(/_/g, ' ')}).</p>
      <YesNo label="Site management told" value={told} onChange={setTold} />
      {told && (
        <label className={fieldLabel}>
          Who at the site
          <input className={bigInput} value={siteContact} onChange={(e) => setSiteContact(e.target.value)} autoComplete="off" />
        </label>
      )}
      {problem && <Alert>{problem}</Alert>}
      {intent.error && <Alert>{intent.error.message}</Alert>}
      <button type="submit" className={`${bigButton} w-full`} disabled={intent.busy}>
        {intent.busy ? 'Logging…' : 'Log notice'}
      </button>
    </form>
  )
}

/** `waiting` says why a logged notice does not count yet (an e-mailed notice not sent). */
export function StartButton({ visitId, version, noticeLogged, waiting = null }: { visitId: number; version: number; noticeLogged: boolean; waiting?: string | null }) {
  const intent = useVisitIntent(visitId)
  return (
    <div className="space-y-2">
      <button
        type="button"
        className={`${bigButton} w-full`}
        disabled={!noticeLogged || waiting !== null || intent.busy}
        aria-describedby="start-why"
        onClick={() => intent.send({ intent: 'start', version })}
      >
        {intent.busy ? 'Starting…' : 'Start work'}
      </button>
      <p id="start-why" className="text-sm text-ink-soft">
        {waiting ?? (noticeLogged ? 'The notice is logged: the system is in test.' : 'Start is locked until a notice to the monitoring company is logged.')}
      </p>
      {intent.error && <Alert>{intent.error.message}</Alert>}
    </div>
  )
}

export function AllClearForm({ visitId, version, timeZone, now }: { visitId: number; version: number; timeZone: string; now: string }) {
  const intent = useVisitIntent(visitId)
  const [who, setWho] = useState('')
  const [at, setAt] = useState(() => toLocalInput(now, timeZone))
  const [problem, setProblem] = useState<string | null>(null)
  async function submit(e: React.FormEvent) {
    e.preventDefault()
    setProblem(null)
    const iso = fromLocalInput(at, timeZone)
    if (!who.trim()) return setProblem('Say who confirmed the system is out of test.')
    if (!iso) return setProblem('Give the time of the all-clear.')
    await intent.send({ intent: 'all-clear', version, confirmedWith: who.trim(), at: iso })
  }
  return (
    <form onSubmit={submit} aria-labelledby="clear-h" className="space-y-4 rounded-md border border-line bg-panel p-3 sm:p-4">
      <h2 id="clear-h" className="text-lg font-semibold">
        Log the all-clear
      </h2>
      <p className="text-sm text-ink-soft">Have the monitoring company take the system out of test and confirm it shows normal.</p>
      <label className={fieldLabel}>
        Who confirmed
        <input className={bigInput} value={who} onChange={(e) => setWho(e.target.value)} autoComplete="off" />
      </label>
      <label className={fieldLabel}>
        When
        <input type="datetime-local" className={bigInput} value={at} onChange={(e) => setAt(e.target.value)} />
      </label>
      {problem && <Alert>{problem}</Alert>}
      {intent.error && <Alert>{intent.error.message}</Alert>}
      <button type="submit" className={`${bigButton} w-full`} disabled={intent.busy}>
        {intent.busy ? 'Logging…' : 'Log all-clear'}
      </button>
    </form>
  )
}
