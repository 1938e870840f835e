import { Link, useRevalidator } from 'react-router'
import { Breadcrumb } from '~/components/breadcrumb'
import { requireUser } from '~/.server/auth'
import { getDb } from '~/.server/db'
import { technicianOptions } from '~/.server/lists/visits'
import { pageNotFound, pageRecordId } from '~/.server/repos/record-id'
import { visitRecord } from '~/.server/repos/visit'
import { visitFieldData } from '~/.server/repos/visit-field'
import { Caution } from '~/components/caution'
import { PhotoUpload } from '~/components/photo-upload'
import { StateBadge } from '~/components/state-badge'
import { Fact } from '~/components/ui/facts'
import { DetectorEntryForm, roofWalk, taskWords, type FormDetector } from '~/components/visit/detector-entry-form'
import { AllClearForm, NoticeForm, StartButton } from '~/components/visit/notice-form'
import { EmailAllClearForm, EmailNoticeForm, VisitEmailLine } from '~/components/visit/notice-email'
import { OfficeActions } from '~/components/visit/office-actions'
import { siteClock } from '~/components/visit/site-time'
import { can, type RouteAccess } from '~/domain/permissions'
import { Day } from '~/components/day'
import type { Route } from './+types/_app.visits.$visitId._index'

export const handle = { access: { loader: 'view:fleet' } satisfies RouteAccess }

export const meta: Route.MetaFunction = ({ data }) => [
  { title: data ? `${data.visit.kind[0].toUpperCase()}${data.visit.kind.slice(1)} at ${data.site.name} · Ductkeeper` : 'Visit · Ductkeeper' },
]

// The page shows `visitRecord` (the same shape as GET /api/visits/:id) plus what the phone form needs
// to check readings as they are typed: each detector's recorded loop, unit input style and listing.
export async function loader({ request, params }: Route.LoaderArgs) {
  const user = await requireUser(request, 'view:fleet')
  const db = getDb()
  const visitId = pageRecordId(params, 'visitId', 'visit')
  const record = visitRecord(db, visitId)
  const field = visitFieldData(db, visitId)
  if (!record || !field) throw pageNotFound('visit')
  const mine = record.technician?.id === user.id
  return {
    ...record,
    field,
    now: new Date().toISOString(),
    may: {
      record: can(user.role, 'record:any-visit') || (can(user.role, 'record:work') && mine),
      schedule: can(user.role, 'schedule:visits'),
    },
    technicians: can(user.role, 'schedule:visits') ? technicianOptions(db) : [],
  }
}

const METHOD_WORDS = { phone: 'Phone', email: 'E-mail', portal: 'Online portal' } as const
const RESULT_WORDS: Record<string, { value: string; label: string }> = {
  pending: { value: 'unknown', label: 'To do' },
  pass: { value: 'pass', label: 'Pass' },
  fail: { value: 'fail', label: 'Fail' },
  skipped: { value: 'cancelled', label: 'Not tested' },
}

export default function Visit({ loaderData }: Route.ComponentProps) {
  const { visit: v, site: s, customer, monitoring: mc, technician, detectors, notifications, attachments, field, now, may } = loaderData
  const tz = s.timeZone
  const notices = notifications.rows
  const latest = notices.at(-1) ?? null
  const noticeLogged = latest !== null && latest.clearedAt === null
  const ordered = roofWalk(detectors.rows)
  const formDetectors: FormDetector[] = ordered.flatMap((d) => {
    const f = field.detectors[d.id]
    return f ? [{ ...f, tag: d.tag, unit: d.unit, position: d.position, tasks: d.tasks, result: d.result, resultReason: d.resultReason }] : []
  })
  const done = detectors.rows.filter((d) => d.result !== 'pending').length
  const photos = attachments
  const revalidator = useRevalidator()
  const tagOf = new Map(detectors.rows.map((d) => [d.id, d.tag]))

  return (
    <div className="mx-auto max-w-6xl space-y-5 text-base">
      <header>
        <Breadcrumb
          items={[
            { to: '/visits', name: 'Visits' },
            { to: `/customers/${customer.id}`, name: customer.name },
          ]}
        />
        <h1 className="mt-1 text-2xl font-semibold break-words">
          <span className="capitalize">{v.kind}</span> at{' '}
          <Link to={`/sites/${s.id}`} className="hover:underline">
            {s.name}
          </Link>
        </h1>
        <p className="mt-1 flex flex-wrap items-center gap-x-3 gap-y-1 text-ink-soft">
          <StateBadge value={v.status} />
          <span>
            <Day iso={v.scheduledOn} />
            {v.windowFrom && (
              <>
                , <span className="font-mono">{v.windowFrom}</span>–<span className="font-mono">{v.windowUntil ?? '…'}</span>
              </>
            )}
          </span>
          <span>{technician?.name ? `Technician: ${technician.name}` : <span className="text-late">No technician assigned</span>}</span>
          <span>
            {done} of {detectors.total} {detectors.total === 1 ? 'detector' : 'detectors'} recorded
          </span>
          <Link to={`/visits/${v.id}/record`} className="text-ink-soft underline decoration-line-strong underline-offset-2 hover:text-ink">
            Inspection record
          </Link>
        </p>
      </header>

      {loaderData.testWindowOverrun && latest && (
        <p role="alert" className="rounded-md border-2 border-late bg-late-soft px-4 py-3 text-lg font-semibold text-late">
          <span aria-hidden="true" className="mr-2 font-mono">
            !
          </span>
          The test window ran out at {siteClock(latest.inTestUntil, tz, now)}. Call {mc?.name ?? 'the monitoring company'}
          {mc?.phone ? (
            <>
              {' '}
              on{' '}
              <a href={`tel:${mc.phone}`} className="underline">
                {mc.phone}
              </a>
            </>
          ) : null}{' '}
          to extend it before any more work, or log the all-clear.
        </p>
      )}
      {v.status === 'cancelled' && (
        <p role="status" className="rounded-md border border-line bg-sunken px-4 py-3">
          Cancelled{v.cancelledAt ? ` ${siteClock(v.cancelledAt, tz, now)}` : ''}: {v.cancelReason ?? 'no reason recorded'}.
        </p>
      )}

      <Caution />

      <div className="grid gap-5 lg:grid-cols-[minmax(0,1fr)_24rem]">
        <div className="min-w-0 space-y-5">
          <WorkArea loaderData={loaderData} noticeLogged={noticeLogged} formDetectors={formDetectors} />

          <section aria-labelledby="dets-h" className="rounded-md border border-line bg-panel">
            <h2 id="dets-h" className="border-b border-line px-4 py-3 text-lg font-semibold">
              Detectors and tasks
            </h2>
            <ol className="divide-y divide-line/70">
              {ordered.map((d) => {
                const r = RESULT_WORDS[d.result] ?? RESULT_WORDS.pending
                return (
                  <li key={d.id} className="flex flex-wrap items-start justify-between gap-x-3 gap-y-1 px-4 py-3">
                    <div className="min-w-0">
                      <Link to={`/devices/${d.id}`} className="font-mono font-semibold text-accent hover:underline">
                        {d.tag}
                      </Link>{' '}
                      <span className="text-sm text-ink-soft">
                        unit <span className="font-mono">{d.unit}</span> · {d.position}
                      </span>
                      <div className="text-sm text-ink-soft">{d.tasks.map(taskWords).join(', ')}</div>
                      {d.resultReason && <div className="text-sm">Why: {d.resultReason}</div>}
                      {d.notes && <div className="text-sm text-ink-soft">Notes: {d.notes}</div>}
                    </div>
                    <StateBadge value={r.value} label={r.label} />
                  </li>
                )
              })}
            </ol>
            {detectors.total > detectors.rows.length && (
              <p className="border-t border-line px-4 py-2 text-sm text-ink-faint">
                Showing {detectors.rows.length} of {detectors.total}.
              </p>
            )}
          </section>

          <section aria-labelledby="photos-h" className="rounded-md border border-line bg-panel p-4">
            <h2 id="photos-h" className="text-lg font-semibold">
              Photos and files
            </h2>
            {may.record && v.status !== 'cancelled' && (
              <div className="mt-3">
                <PhotoUpload visitId={v.id} onUploaded={() => void revalidator.revalidate()} />
              </div>
            )}
            {photos.length === 0 ? (
              <p className="mt-2 text-ink-soft">None yet.</p>
            ) : (
              <ul className="mt-3 grid grid-cols-2 gap-3 sm:grid-cols-4">
                {photos.map((a) => (
                  <li key={a.id} className="min-w-0">
                    <a href={`/api/attachments/${a.id}`} className="block rounded-md border border-line p-1 hover:border-accent">
                      {a.hasThumb ? (
                        <img src={`/api/attachments/${a.id}/thumb`} alt={a.fileName} loading="lazy" className="aspect-square w-full rounded-sm object-cover" />
                      ) : (
                        <span className="flex aspect-square items-center justify-center rounded-sm bg-sunken font-mono text-sm">file</span>
                      )}
                      <span className="mt-1 block truncate text-sm">{a.fileName}</span>
                      {a.detectorId && <span className="block truncate font-mono text-xs text-ink-soft">{tagOf.get(a.detectorId) ?? `detector ${a.detectorId}`}</span>}
                    </a>
                  </li>
                ))}
              </ul>
            )}
          </section>
        </div>

        {/* Before work the phone shows who to notify first; once under way the form comes first. */}
        <aside className={`min-w-0 space-y-5 ${v.status === 'planned' || v.status === 'notified' ? 'max-lg:order-first' : ''}`}>
          <section aria-labelledby="site-h" className="rounded-md border border-line bg-panel p-4">
            <h2 id="site-h" className="text-lg font-semibold">
              Site
            </h2>
            <dl className="mt-2 grid grid-cols-[auto_minmax(0,1fr)] gap-x-3 gap-y-1.5">
              <Fact label="Name">{s.name}</Fact>
              <Fact label="Address">
                {s.street}, {s.city} {field.postalCode}
              </Fact>
              <Fact label="Access">{s.accessNotes ?? <span className="text-ink-faint">No notes</span>}</Fact>
              {v.notes && <Fact label="Visit notes">{v.notes}</Fact>}
            </dl>
          </section>
          <MonitoringCard mc={mc} account={s.monitoringAccount} />
          <NoticeList notices={notices} emails={loaderData.emails} visitId={v.id} version={v.version} mayRetry={may.record} tz={tz} now={now} />
          {may.schedule && v.status !== 'done' && v.status !== 'cancelled' && (
            <OfficeActions
              visitId={v.id}
              version={v.version}
              status={v.status}
              kind={v.kind}
              notes={v.notes}
              technicianId={technician?.id ?? null}
              technicians={loaderData.technicians}
              scheduledOn={v.scheduledOn}
              windowFrom={v.windowFrom}
              windowUntil={v.windowUntil}
            />
          )}
        </aside>
      </div>
    </div>
  )
}

type Data = Route.ComponentProps['loaderData']

// What the person can do next, in the order the work goes: notice, start, record, all-clear.
function WorkArea({ loaderData: d, noticeLogged, formDetectors }: { loaderData: Data; noticeLogged: boolean; formDetectors: FormDetector[] }) {
  const { visit: v, site: s, monitoring: mc, may, now } = d
  const latest = d.notifications.rows.at(-1) ?? null
  // Where the monitoring company takes e-mail, the notice and the all-clear can go from here.
  const mail = mc?.name && mc.email ? { company: mc.name, to: mc.email } : null
  const noticeMail = d.emails.find((m) => m.kind === 'notice')
  const unsent = latest && noticeMail && latest.confirmation === `e-mail message ${noticeMail.id}` && noticeMail.status !== 'sent' ? noticeMail : null
  const allClear = (
    <>
      <AllClearForm visitId={v.id} version={v.version} timeZone={s.timeZone} now={now} />
      {mail && !d.emails.some((m) => m.kind === 'all-clear') && <EmailAllClearForm visitId={v.id} version={v.version} {...mail} />}
    </>
  )
  if (!may.record) {
    if (v.status === 'done' || v.status === 'cancelled') return null
    return <p className="rounded-md border border-line bg-sunken px-4 py-3">Only the assigned technician or the office records work on this visit.</p>
  }
  if (v.status === 'planned' || v.status === 'notified')
    return (
      <div className="space-y-4">
        {!noticeLogged && mail && mc?.notifyMethod === 'email' && <EmailNoticeForm visitId={v.id} version={v.version} {...mail} timeZone={s.timeZone} now={now} />}
        {/* An e-mailed notice that has not gone leaves the phone open: a notice logged by phone then counts. */}
        {(!noticeLogged || unsent) && <NoticeForm visitId={v.id} version={v.version} preferred={mc?.notifyMethod ?? null} timeZone={s.timeZone} now={now} />}
        {!noticeLogged && mail && mc?.notifyMethod !== 'email' && !noticeMail && <EmailNoticeForm visitId={v.id} version={v.version} {...mail} timeZone={s.timeZone} now={now} />}
        <StartButton
          visitId={v.id}
          version={v.version}
          noticeLogged={noticeLogged}
          waiting={unsent ? (unsent.status === 'failed' ? 'The e-mailed notice did not go: send it again under Notices, or phone them and log that notice.' : 'The e-mailed notice has not gone yet.') : null}
        />
      </div>
    )
  if (v.status === 'in-progress')
    return (
      <div className="space-y-5">
        <section aria-labelledby="record-h" className="space-y-3">
          <h2 id="record-h" className="text-lg font-semibold">
            Record the work
          </h2>
          <DetectorEntryForm visitId={v.id} version={v.version} detectors={formDetectors} delayPolicySeconds={d.field.delayPolicySeconds} />
        </section>
        {latest && !latest.clearedAt && allClear}
      </div>
    )
  if (v.status === 'done' && latest && !latest.clearedAt) return <div className="space-y-4">{allClear}</div>
  return null
}

function MonitoringCard({ mc, account }: { mc: Data['monitoring']; account: string | null }) {
  if (!mc?.name)
    return (
      <section className="rounded-md border border-late/40 bg-late-soft p-4 text-late">
        No monitoring company is on record for this site. Find out who monitors the fire alarm system before any work.
      </section>
    )
  const phone = (
    <a href={`tel:${mc.phone}`} className="inline-flex min-h-11 items-center font-mono text-lg font-semibold text-accent underline">
      {mc.phone}
    </a>
  )
  const email = mc.email ? (
    <a href={`mailto:${mc.email}`} className="inline-flex min-h-11 items-center font-semibold break-all text-accent underline">
      {mc.email}
    </a>
  ) : null
  // The company's preferred way of being told comes first.
  const ways =
    mc.notifyMethod === 'email' && email
      ? [
          { label: 'E-mail (preferred)', el: email },
          { label: 'Phone', el: phone },
        ]
      : [{ label: mc.notifyMethod === 'phone' ? 'Phone (preferred)' : 'Phone', el: phone }, ...(email ? [{ label: 'E-mail', el: email }] : [])]
  return (
    <section aria-labelledby="mon-h" className="rounded-md border border-soon/40 bg-panel p-4">
      <h2 id="mon-h" className="text-lg font-semibold">
        Notify first: {mc.name}
      </h2>
      <p className="mt-1 text-sm text-ink-soft">
        Wants notice {mc.notifyMethod === 'portal' ? 'through their online portal' : `by ${METHOD_WORDS[mc.notifyMethod].toLowerCase()}`}, at least {mc.notifyLeadMinutes} min
        before work.
        {account && (
          <>
            {' '}
            Account <span className="font-mono">{account}</span>.
          </>
        )}
      </p>
      <dl className="mt-2 grid grid-cols-[auto_minmax(0,1fr)] items-center gap-x-3">
        {ways.map((w) => (
          <Fact key={w.label} label={w.label}>
            {w.el}
          </Fact>
        ))}
      </dl>
    </section>
  )
}

function NoticeList({
  notices,
  emails,
  visitId,
  version,
  mayRetry,
  tz,
  now,
}: {
  notices: Data['notifications']['rows']
  emails: Data['emails']
  visitId: number
  version: number
  mayRetry: boolean
  tz: string
  now: string
}) {
  return (
    <section aria-labelledby="notices-h" className="rounded-md border border-line bg-panel p-4">
      <h2 id="notices-h" className="text-lg font-semibold">
        Notices
      </h2>
      {notices.length === 0 ? (
        <p className="mt-2 text-ink-soft">No notice logged yet.</p>
      ) : (
        <ol className="mt-2 space-y-3">
          {notices.map((n) => (
            <li key={n.id} className="space-y-0.5 text-sm">
              <div className="text-base">
                {n.method === 'email' ? (
                  <>
                    {METHOD_WORDS.email} to <span className="font-medium break-words">{n.spokeWith}</span>
                  </>
                ) : (
                  <>
                    {METHOD_WORDS[n.method]} · spoke with <span className="font-medium">{n.spokeWith}</span>
                  </>
                )}
                {n.confirmation && (
                  <>
                    {' '}
                    · {n.confirmation.startsWith('e-mail message ') ? n.confirmation : <>conf. <span className="font-mono">{n.confirmation}</span></>}
                  </>
                )}
              </div>
              <div className="text-ink-soft">
                Logged {siteClock(n.notifiedAt, tz, now)} by {n.notifiedBy ?? 'someone not on record'} · site told: {n.siteContactTold ?? 'not recorded'}
              </div>
              <div>
                In test <span className="font-mono">{siteClock(n.inTestFrom, tz, now)}</span>–<span className="font-mono">{siteClock(n.inTestUntil, tz, now)}</span>
              </div>
              <div>
                {n.clearedAt ? (
                  <>
                    <StateBadge value="done" label={`All-clear ${siteClock(n.clearedAt, tz, now)}`} />
                    {/* An e-mailed all-clear names an address and its message: long, so it wraps beside the badge. */}
                    {n.clearedWith && <span className="ml-1.5 break-words">with {n.clearedWith}</span>}
                  </>
                ) : n.inTestUntil > now ? (
                  <StateBadge value="in-progress" label="In test now" />
                ) : (
                  <StateBadge value="overdue" label="Window ended, no all-clear" />
                )}
              </div>
            </li>
          ))}
        </ol>
      )}
      {emails.length > 0 && (
        <div className="mt-3 space-y-2">
          {emails.map((m) => (
            <VisitEmailLine key={m.id} email={m} visitId={visitId} version={version} tz={tz} now={now} mayRetry={mayRetry} />
          ))}
        </div>
      )}
      <p className="mt-3 text-xs text-ink-faint">Times in site time ({tz.replace(/_/g, ' ')}).</p>
    </section>
  )
}
