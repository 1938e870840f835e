// The notice of work and the all-clear sent by e-mail where the monitoring company takes it, and how
// each one fared: queued, sent (with the provider's message id) or failed with the reason, to retry.
import { useState, useSyncExternalStore } from 'react'
import { StateBadge } from '~/components/state-badge'
import { Alert, YesNo, bigButton, bigInput, bigQuietButton, fieldLabel, useVisitIntent } from './field-ui'
import { fromLocalInput, siteClock, toLocalInput } from './site-time'

const FOUR_HOURS_MS = 4 * 60 * 60 * 1000
// The number last given on this device, so a technician types their own number once.
const CALL_BACK_KEY = 'ductkeeper.callBack'

const noSubscription = () => () => {}

function useCallBack(): [string, (v: string) => void] {
  // The stored number once hydrated (the server renders the field empty), until the person types.
  const stored = useSyncExternalStore(noSubscription, () => window.localStorage.getItem(CALL_BACK_KEY) ?? '', () => '')
  const [typed, setTyped] = useState<string | null>(null)
  return [typed ?? stored, setTyped]
}
const remember = (v: string) => window.localStorage.setItem(CALL_BACK_KEY, v)

function CallBackField({ value, onChange }: { value: string; onChange: (v: string) => void }) {
  return (
    <label className={fieldLabel}>
      Call-back number (yours or the office&apos;s)
      <input className={bigInput} type="tel" inputMode="tel" autoComplete="tel" value={value} onChange={(e) => onChange(e.target.value)} placeholder="(503) 555-0134" />
    </label>
  )
}

export function EmailNoticeForm({ visitId, version, company, to, timeZone, now }: { visitId: number; version: number; company: string; to: string; timeZone: string; now: string }) {
  const intent = useVisitIntent(visitId)
  const [from, setFrom] = useState(() => toLocalInput(now, timeZone))
  const [until, setUntil] = useState(() => toLocalInput(new Date(Date.parse(now) + FOUR_HOURS_MS).toISOString(), timeZone))
  const [callBack, setCallBack] = useCallBack()
  const [told, setTold] = useState<boolean | undefined>(undefined)
  const [siteContact, setSiteContact] = useState('')
  const [problem, setProblem] = useState<string | null>(null)

  async function submit(e: React.FormEvent) {
    e.preventDefault()
    setProblem(null)
    const inTestFrom = fromLocalInput(from, timeZone)
    const inTestUntil = fromLocalInput(until, timeZone)
    if (!inTestFrom || !inTestUntil) return setProblem('Give the test window, from and until.')
    if (inTestUntil <= inTestFrom) return setProblem('The test window must end after it starts.')
    if (!callBack.trim()) return setProblem('Give a number the monitoring company can call back.')
    if (told === undefined) return setProblem('Say whether site management was told.')
    remember(callBack.trim())
    await intent.send({ intent: 'email-notice', version, inTestFrom, inTestUntil, callBack: callBack.trim(), siteManagementTold: told, siteContact: siteContact.trim() || undefined })
  }

  return (
    <form onSubmit={submit} aria-labelledby="email-notice-h" className="space-y-4 rounded-md border border-line bg-panel p-3 sm:p-4">
      <h2 id="email-notice-h" className="text-lg font-semibold">
        E-mail the notice
      </h2>
      <p className="text-sm text-ink-soft">
        Sends {company} (<span className="break-words">{to}</span>) the site, account, address, detectors, test window, technician and your call-back number, and logs
        it as this visit&apos;s notice. Wait for their confirmation before tripping anything.
      </p>
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
      <CallBackField value={callBack} onChange={setCallBack} />
      <YesNo label="Has site management been told?" value={told} onChange={setTold} />
      {told && (
        <label className={fieldLabel}>
          Who at the site
          <input className={bigInput} value={siteContact} onChange={(e) => setSiteContact(e.target.value)} autoComplete="off" />
        </label>
      )}
      {problem && <Alert>{problem}</Alert>}
      {intent.error && <Alert>{intent.error.message}</Alert>}
      <button type="submit" className={`${bigButton} w-full`} disabled={intent.busy}>
        {intent.busy ? 'Sending…' : 'Send notice by e-mail'}
      </button>
    </form>
  )
}

export function EmailAllClearForm({ visitId, version, company, to }: { visitId: number; version: number; company: string; to: string }) {
  const intent = useVisitIntent(visitId)
  const [callBack, setCallBack] = useCallBack()
  const [problem, setProblem] = useState<string | null>(null)
  async function submit(e: React.FormEvent) {
    e.preventDefault()
    setProblem(null)
    if (!callBack.trim()) return setProblem('Give a number the monitoring company can call back.')
    remember(callBack.trim())
    await intent.send({ intent: 'email-all-clear', version, callBack: callBack.trim() })
  }
  return (
    <form onSubmit={submit} aria-labelledby="email-clear-h" className="space-y-4 rounded-md border border-line bg-panel p-3 sm:p-4">
      <h2 id="email-clear-h" className="text-lg font-semibold">
        E-mail the all-clear
      </h2>
      <p className="text-sm text-ink-soft">
        Tells {company} (<span className="break-words">{to}</span>) the work is finished and asks them to take the system out of test and check it shows normal.
      </p>
      <CallBackField value={callBack} onChange={setCallBack} />
      {problem && <Alert>{problem}</Alert>}
      {intent.error && <Alert>{intent.error.message}</Alert>}
      <button type="submit" className={`${bigButton} w-full`} disabled={intent.busy}>
        {intent.busy ? 'Sending…' : 'Send all-clear by e-mail'}
      </button>
    </form>
  )
}

export interface VisitEmailRow {
  id: number
  kind: string
  to: string
  status: 'queued' | 'sending' | 'sent' | 'failed'
  attempts: number
  error: string | null
  nextAttemptAt: string | null
  providerId: string | null
  createdAt: string
  sentAt: string | null
}

const STATUS_WORDS = { queued: 'Queued', sending: 'Sending', sent: 'Sent', failed: 'Failed' } as const
const STATUS_TONE = { queued: 'notified', sending: 'notified', sent: 'done', failed: 'fail' } as const

/** One e-mailed notice or all-clear on the visit's log, with a retry when the provider refused it. */
export function VisitEmailLine({ email: m, visitId, version, tz, now, mayRetry }: { email: VisitEmailRow; visitId: number; version: number; tz: string; now: string; mayRetry: boolean }) {
  const intent = useVisitIntent(visitId)
  const what = m.kind === 'notice' ? 'Notice' : 'All-clear'
  return (
    <div className="space-y-1 rounded-md border border-line bg-sunken/50 px-3 py-2 text-sm" data-email-kind={m.kind}>
      <div className="flex flex-wrap items-center gap-x-2 gap-y-1">
        <span className="font-medium">{what} e-mail</span>
        <StateBadge value={STATUS_TONE[m.status]} label={STATUS_WORDS[m.status]} />
        <span className="min-w-0 break-words text-ink-soft">to {m.to}</span>
      </div>
      <div className="text-ink-soft">
        Message {m.id}
        {m.status === 'sent' && m.sentAt ? ` · sent ${siteClock(m.sentAt, tz, now)}` : ` · queued ${siteClock(m.createdAt, tz, now)}`}
        {m.providerId && (
          <>
            {' '}
            · provider id <span className="font-mono break-words">{m.providerId}</span>
          </>
        )}
        {m.status === 'queued' && m.nextAttemptAt ? ` · next try ${siteClock(m.nextAttemptAt, tz, now)}` : ''}
      </div>
      {m.error && m.status !== 'sent' && (
        <Alert tone={m.status === 'failed' ? 'error' : 'warn'}>
          {m.status === 'failed' ? 'Not sent: ' : 'Last try: '}
          {m.error}
          {m.status === 'failed' && m.kind === 'notice' ? '. The monitoring company has not been told: send it again, or phone them and log that notice.' : ''}
          {m.status === 'failed' && m.kind === 'all-clear' ? '. The system may still be in test: send it again, or phone them.' : ''}
        </Alert>
      )}
      {m.status === 'failed' && mayRetry && (
        <>
          <button
            type="button"
            className={`${bigQuietButton} w-full sm:w-auto`}
            disabled={intent.busy}
            onClick={() => intent.send({ intent: 'retry-email', version, kind: m.kind === 'notice' ? 'notice' : 'all-clear' })}
          >
            {intent.busy ? 'Sending…' : `Send the ${what.toLowerCase()} again`}
          </button>
          {intent.error && <Alert>{intent.error.message}</Alert>}
        </>
      )}
    </div>
  )
}
