import { Link } from 'react-router'
import { Breadcrumb } from '~/components/breadcrumb'
import { EditLink } from '~/components/forms/edit-link'
import { requireUser } from '~/.server/auth'
import { getDb } from '~/.server/db'
import { deviceReport } from '~/.server/device-report'
import { pageNotFound, pageRecordId } from '~/.server/repos/record-id'
import { officeToday } from '~/.server/today'
import { openVisitsOfDetector } from '~/.server/repos/visit-field'
import { noticeTermsOfSite } from '~/.server/repos/notice-terms'
import { BookVisit } from '~/components/visit/book-visit'
import { Caution } from '~/components/caution'
import { EventTimeline } from '~/components/event-timeline'
import { StateBadge } from '~/components/state-badge'
import { WiringDiagram } from '~/components/wiring-diagram'
import { DEFAULT_MAX_LINE_OHMS, DEFAULT_TOLERANCE } from '~/domain/loop'
import { DETECTOR_STATES, STATE_LABELS } from '~/domain/contacts'
import type { Expected, Reading } from '~/domain/loop'
import type { RouteAccess } from '~/domain/permissions'
import { TASK_LABELS, type TaskDue } from '~/domain/schedule'
import { formatCount, formatDay } from '~/utils/format'
import { siteDateTime } from '~/utils/time-format'
import type { Route } from './+types/_app.devices.$deviceId'
import { Fact } from '~/components/ui/facts'
import { TAP } from '~/components/ui/tap'

export const handle = { access: { loader: 'view:fleet' } satisfies RouteAccess }

export const meta: Route.MetaFunction = ({ data }) => [
  { title: data ? `${data.report.device.tag} · ${data.report.device.siteName} · Ductkeeper` : 'Detector · Ductkeeper' },
]

// The same report as /api/devices/:id: the stored record and the one derivation of its facts.
export async function loader({ request, params }: Route.LoaderArgs) {
  await requireUser(request, 'view:fleet')
  const today = officeToday()
  const id = pageRecordId(params, 'deviceId', 'detector')
  const report = deviceReport(getDb(), id, today)
  if (!report) throw pageNotFound('detector')
  return { report, today, openVisits: openVisitsOfDetector(getDb(), id), notice: noticeTermsOfSite(getDb(), report.device.siteId) }
}

const ohms = (n: number) => `${formatCount(Math.round(n * 10) / 10)} Ω`
const showExpected = (e: Expected) => ('open' in e ? 'open (over-range)' : e.min === 0 ? `short, ≤ ${ohms(e.max)}` : `${ohms(e.min)} – ${ohms(e.max)}`)
const showReading = (r: Reading | undefined) => (r === undefined ? '—' : r === 'open' ? 'open' : ohms(r))
const METHOD_WORDS = { phone: 'by phone', email: 'by e-mail', portal: 'through their online portal' } as const
// Whole minutes and seconds, as the module's switches are read: 170 s is "2 min 50 s", never 2.83 min.
const minSec = (s: number) => [Math.floor(s / 60) && `${Math.floor(s / 60)} min`, s % 60 && `${Math.round(s % 60)} s`].filter(Boolean).join(' ')
// A tag that already starts with its kind ("RTU-1") is not named twice ("RTU RTU-1").
const unitName = (kind: string, tag: string) => (tag.toUpperCase().startsWith(kind.toUpperCase()) ? tag : `${kind.toUpperCase()} ${tag}`)
/** A task's badge: the nominal date, or how it stands against the window the standard allows. */
const dueWords = (t: TaskDue) =>
  t.status === 'overdue' ? `Overdue: due ${t.dueOn}, ${t.daysOverdue} d past the window` : t.status === 'due' ? `Due ${t.dueOn}, ${t.overdueAfter === t.dueOn ? 'the last day' : 'inside the window'}` : `Due ${t.dueOn}`
const delayWords = (s: number | null) => (s === null ? 'not recorded' : s === 0 ? 'report at once' : `${minSec(s)} delay`)

function fits(e: Expected, r: Reading | undefined): boolean | null {
  if (r === undefined) return null
  if ('open' in e) return r === 'open'
  return r !== 'open' && r >= e.min && r <= e.max
}

export default function Device({ loaderData }: Route.ComponentProps) {
  const { report: r, today, openVisits, notice } = loaderData
  const d = r.device
  const faultCodes = new Set(r.loop.findings.filter((f) => f.state === null).map((f) => f.code))
  const loopReadBy = r.readings.find((x) => x.readAtPanelBy)?.readAtPanelBy ?? null
  return (
    <div className="mx-auto max-w-6xl space-y-6">
      <header>
        <Breadcrumb
          items={[
            { to: `/customers/${d.customerId}`, name: d.customerName },
            { to: `/sites/${d.siteId}`, name: d.siteName },
            { to: `/units/${d.unitId}`, name: d.unitTag, mono: true },
          ]}
        />
        <div className="mt-1 flex flex-wrap items-center gap-x-3 gap-y-2">
          <h1 className="font-mono text-2xl font-semibold break-all">{d.tag}</h1>
          <div role="group" aria-label="State" data-first="state" className="flex flex-wrap items-center gap-2">
            <StateBadge value={d.state} />
            <StateBadge value={r.stored.dueStatus} />
            <StateBadge value={r.loop.verdict} prefix="Loop" />
          </div>
          <span className="text-sm text-ink-soft">
            Risk {r.risk.score}
            {r.risk.reasons.length > 0 && ` · ${r.risk.reasons[0].text}`}
          </span>
        </div>
        <p className="mt-1 text-sm text-ink-soft">
          {d.position === 'supply' ? 'Supply' : 'Return'} duct of {unitName(d.unitKind, d.unitTag)}
          {d.unitLocation && ` (${d.unitLocation})`} · {d.street}, {d.city} · {d.modelName}
        </p>
        <div className="mt-3">
          <EditLink to={`/devices/${d.id}/edit`} what="detector" />
        </div>
      </header>

      {/* What is needed at the unit comes first on a phone, in this order; on a wide desk the notice and the
          visit share the third column. */}
      <div className="grid gap-6 lg:grid-cols-2 xl:grid-cols-3">
        <section aria-labelledby="due-h" data-first="due" className="rounded-md border border-line bg-panel p-4 xl:row-span-2">
          <h2 id="due-h" className="font-semibold">
            What falls due
          </h2>
          <ul className="mt-3 space-y-2.5 text-sm">
            {r.schedule.map((t) => (
              <li key={t.task}>
                <div className="flex flex-wrap items-center justify-between gap-x-2 gap-y-1">
                  <span className="font-medium">{TASK_LABELS[t.task]}</span>
                  <StateBadge value={t.status} label={dueWords(t)} />
                </div>
                <div className="text-xs text-ink-faint">{t.basis}</div>
                <div className="text-xs text-ink-faint">
                  {t.overdueAfter === t.dueOn ? 'Overdue the day after' : `Overdue after ${t.overdueAfter}`}: {t.windowBasis}
                </div>
              </li>
            ))}
          </ul>
          <p className="mt-3 text-xs text-ink-faint">As of {formatDay(today)}.</p>
        </section>

        <section aria-labelledby="loop-h" data-first="expected" className="@container min-w-0 rounded-md border border-line bg-panel xl:row-span-2">
          <div className="border-b border-line px-4 py-3">
            <h2 id="loop-h" className="font-semibold">
              Expected readings across the panel pair
            </h2>
            <p className="mt-0.5 text-xs text-ink-faint">
              Measured at the panel end · line {ohms(r.loop.lineOhms)} (NEC Chapter 9 Table 8, 75 °C)
              {r.readings[0] && ` · last taken ${siteDateTime(r.readings[0].takenAt, d.timeZone)}${r.readings[0].takenBy ? ` by ${r.readings[0].takenBy}` : ''}`}
              {loopReadBy && ` · loop read at the panel by ${loopReadBy}`}
            </p>
          </div>
          {/* One row per detector state: a table's columns on a desk, a short stack on a phone. */}
          <div aria-hidden="true" className="hidden grid-cols-[minmax(0,1.3fr)_minmax(0,1.2fr)_minmax(0,1fr)_5.5rem] gap-x-3 px-4 pt-2 pb-1 text-xs font-medium text-ink-faint uppercase @md:grid">
            <span>Detector state</span>
            <span>Expected (correct loop)</span>
            <span>Last reading</span>
            <span>Fits</span>
          </div>
          <ul className="divide-y divide-line/70 text-sm">
            {DETECTOR_STATES.map((s) => {
              // A reading in range beside a fault is not a pass: the mark stays neutral until the loop passes.
              const ok = fits(r.loop.expected[s], r.loopReadings[s])
              const recorded = r.loop.expectedAsRecorded?.[s]
              const differs = recorded !== undefined && showExpected(recorded) !== showExpected(r.loop.expected[s])
              return (
                <li key={s} data-state={s} className="grid grid-cols-[minmax(0,1fr)_auto] gap-x-3 gap-y-0.5 px-4 py-2 @md:grid-cols-[minmax(0,1.3fr)_minmax(0,1.2fr)_minmax(0,1fr)_5.5rem] @md:items-center">
                  <span className="font-medium @md:font-normal">{STATE_LABELS[s]}</span>
                  <span className="col-start-1 row-start-2 font-mono text-xs @md:col-start-2 @md:row-start-1">
                    <span className="font-sans text-ink-faint @md:hidden">Expect </span>
                    {differs ? (
                      <>
                        <span className="block">
                          <span className="font-sans text-ink-faint">as it should be </span>
                          {showExpected(r.loop.expected[s])}
                        </span>
                        <span className="block">
                          <span className="font-sans text-ink-faint">as recorded </span>
                          {showExpected(recorded)}
                        </span>
                      </>
                    ) : (
                      showExpected(r.loop.expected[s])
                    )}
                  </span>
                  <span className="col-start-1 row-start-3 font-mono text-xs @md:col-start-3 @md:row-start-1">
                    <span className="font-sans text-ink-faint @md:hidden">Last </span>
                    {showReading(r.loopReadings[s])}
                  </span>
                  <span className="col-start-2 row-span-3 row-start-1 self-center @md:col-start-4 @md:row-span-1">
                    {ok === null ? (
                      <span className="text-xs text-ink-faint">not measured</span>
                    ) : ok && r.loop.verdict === 'fail' ? (
                      <span className="text-xs text-ink-faint">in range</span>
                    ) : (
                      <StateBadge value={ok ? 'pass' : 'fail'} label={ok ? 'Fits' : 'Off'} />
                    )}
                  </span>
                </li>
              )
            })}
          </ul>
          <div className="border-t border-line px-4 py-3">
            {r.loop.findings.length === 0 ? (
              <p className="text-sm text-ink-soft">
                {r.loop.verdict === 'pass' ? 'The readings fit a correctly wired, supervised loop.' : 'No fault in what was measured; normal, alarm and trouble or power-off are all needed to prove the loop.'}
              </p>
            ) : (
              <ul className="space-y-2 text-sm">
                {r.loop.findings.map((f, i) => (
                  <li key={i} className="flex flex-wrap items-start gap-x-2 gap-y-1">
                    <StateBadge value={f.advisory ? 'advisory' : 'fail'} label={f.code} />
                    <span className="min-w-0 flex-1 basis-48">{f.message}</span>
                  </li>
                ))}
              </ul>
            )}
          </div>
        </section>

        <section aria-labelledby="notify-h" data-first="notify" className="rounded-md border border-soon/40 bg-panel p-4 xl:col-start-3 xl:row-start-1">
          <h2 id="notify-h" className="font-semibold">
            Notify before work
          </h2>
          {notice ? (
            <>
              <p className="mt-2 text-sm">
                <span className="font-medium">{notice.name}</span> wants notice {METHOD_WORDS[notice.method]}, at least{' '}
                <span className="font-semibold">{formatCount(notice.leadMinutes)} minutes</span> before work starts.
              </p>
              <div className="mt-3 flex flex-wrap items-center gap-x-4 gap-y-2 text-sm">
                <a
                  href={`tel:${notice.phone}`}
                  className="inline-flex min-h-11 items-center gap-2 rounded-sm border border-accent px-3 font-mono font-semibold whitespace-nowrap text-accent hover:bg-accent/10"
                >
                  <span aria-hidden="true">☎</span>
                  {notice.phone}
                </a>
                {notice.method === 'email' && notice.email && (
                  <a href={`mailto:${notice.email}`} className="inline-flex min-h-11 items-center break-all text-accent underline sm:min-h-0">
                    {notice.email}
                  </a>
                )}
              </div>
              <dl className="mt-3 grid grid-cols-[auto_1fr] gap-x-4 gap-y-1 text-sm [&_dd]:break-words">
                <Fact label="Account">
                  {notice.account ? <span className="font-mono">{notice.account}</span> : <span className="text-late">Not recorded: ask the site</span>}
                </Fact>
                <Fact label="Lead time">{formatCount(notice.leadMinutes)} min</Fact>
                <Fact label="Hours">{notice.hours}</Fact>
              </dl>
            </>
          ) : (
            <p className="mt-2 text-sm font-medium text-late">
              No monitoring company is on record for this site. Find out who monitors the fire alarm system before any work.
            </p>
          )}
          <p className="mt-3 text-xs text-ink-soft">
            Have the system placed in test and tell site management before the unit is powered down or the detector is tripped.
          </p>
        </section>

        <section aria-labelledby="visit-h" data-first="visit" className="rounded-md border border-line bg-panel p-4 xl:col-start-3 xl:row-start-2">
          <h2 id="visit-h" className="font-semibold">
            Open visit
          </h2>
          {openVisits.length === 0 ? (
            <p className="mt-2 text-sm text-ink-soft">No open visit for this detector.</p>
          ) : (
            <ul className="mt-2 space-y-2 text-sm">
              {openVisits.map((v) => (
                <li key={v.id}>
                  <Link
                    to={`/visits/${v.id}`}
                    className="flex min-h-11 flex-wrap items-center gap-x-2 gap-y-1 rounded-sm border border-line px-3 py-1.5 hover:border-accent"
                  >
                    <span className="font-mono text-xs">{v.scheduledOn}</span>
                    <span className="font-medium text-accent capitalize">{v.kind}</span>
                    <StateBadge value={v.status} />
                    <span className="text-xs text-ink-soft">
                      {v.tasks.map((t) => TASK_LABELS[t as keyof typeof TASK_LABELS] ?? t).join(', ')}
                      {' · '}
                      {v.technician ?? 'not assigned'}
                    </span>
                  </Link>
                </li>
              ))}
            </ul>
          )}
          <div className="mt-3 [&>button]:min-h-11 sm:[&>button]:min-h-0">
            <BookVisit siteId={d.siteId} detectors={[{ id: d.id, tag: d.tag }]} what={d.tag} />
          </div>
        </section>
      </div>

      <Caution />

      <section aria-labelledby="plan-h" className="min-w-0 rounded-md border border-line bg-panel p-4">
        <h2 id="plan-h" className="font-semibold">
          Wiring plan
        </h2>
        <p className="mt-1 text-sm text-ink-soft">As recorded for this detector. Confirm against the device&apos;s own instructions on site.</p>
        <div className="mt-3">
          <WiringDiagram
            shutdownInput={d.shutdownInput}
            auxContacts={d.auxContacts}
            supervisoryLabelledIn={d.supervisoryLabelledIn}
            alarmTerminal={d.alarmTerminal}
            supervisoryTerminal={d.supervisoryTerminal}
            eolPlacement={d.eolPlacement}
            eolOhms={d.eolOhms}
            faults={{
              alarm: faultCodes.has('alarm-on-nc'),
              supervisory: faultCodes.has('supervisory-wrong-terminal'),
              eol: faultCodes.has('not-supervised') || r.loop.findings.some((f) => f.code === 'eol-missing' || f.code === 'eol-wrong-value'),
            }}
          />
        </div>
      </section>

      {/* On a desk the record and its checks stand beside the shutdown plan and the contact table. */}
      <div className="grid items-start gap-6 lg:grid-cols-2">
        <div className="min-w-0 space-y-6">
          <section aria-labelledby="facts-h" className="min-w-0 rounded-md border border-line bg-panel p-4">
            <h2 id="facts-h" className="font-semibold">
              Record
            </h2>
            <dl className="mt-3 grid grid-cols-[auto_minmax(0,1fr)] gap-x-4 gap-y-1.5 text-sm [&_dd]:break-words">
              <Fact label="Heads fitted">{d.headsFitted}</Fact>
              <Fact label="Housing">{d.housing === 'standard' ? 'Standard' : d.housing.toUpperCase().replace('NEMA', 'NEMA ')}</Fact>
              <Fact label="Location">
                <span className="capitalize">{d.environment}</span>
              </Fact>
              <Fact label="Installed">{formatDay(d.installedOn)}</Fact>
              <Fact label="End-of-line">
                {ohms(d.eolOhms)} ±{d.eolTolerancePct ?? DEFAULT_TOLERANCE * 100} %{d.eolTolerancePct === null && ' (usual part, assumed)'},{' '}
                {d.eolPlacement === 'through-supervisory' ? 'through supervisory' : 'across the pair'}
              </Fact>
              <Fact label="Panel alarm threshold">
                {d.alarmThresholdOhms === null ? `not recorded: ${DEFAULT_MAX_LINE_OHMS} Ω assumed (common practice)` : ohms(d.alarmThresholdOhms)}
              </Fact>
              <Fact label="Conductor">
                {d.conductorAwg} AWG {d.conductorStranded ? 'stranded' : 'solid'}, {formatCount(d.runFeet)} ft one way ({ohms(r.loop.lineOhms)} loop)
              </Fact>
              <Fact label="Test station">{d.testStation === 'none' ? 'none' : `${d.testStation}${d.testStationFeet ? `, ${d.testStationFeet} ft away` : ''}`}</Fact>
              <Fact label="Reporting delay">
                {delayWords(d.delaySeconds)} · policy {delayWords(d.delayPolicySeconds)} <StateBadge value={r.delay.agreement} />
              </Fact>
              <Fact label="Monitoring">
                {d.monitoringName ?? 'none on record'}
                {d.monitoringAccount && ` · account ${d.monitoringAccount}`}
              </Fact>
              <Fact label="AHJ">{d.ahjName}</Fact>
            </dl>
            {r.delay.agreement !== 'agree' && <p className="mt-3 text-sm text-ink-soft">{r.delay.action}</p>}
            {r.delay.caution && (
              <p role="note" className="mt-3 rounded-md border border-soon/40 bg-soon-soft px-3 py-2 text-sm">
                <strong className="font-semibold">Caution:</strong> {r.delay.caution}
              </p>
            )}
          </section>
          <section aria-labelledby="air-h" className="rounded-md border border-line bg-panel p-4">
            <h2 id="air-h" className="font-semibold">
              Airflow at the detector
            </h2>
            {r.velocity ? (
              <p className="mt-3 text-sm">
                <StateBadge value={r.velocity.status === 'in-range' ? 'pass' : 'fail'} label={r.velocity.status} />{' '}
                {formatCount(Math.round(r.velocity.velocityFpm))} ft/min from {formatCount(d.position === 'supply' ? d.supplyCfm : d.returnCfm)} cfm; listed{' '}
                {formatCount(d.velocityMinFpm)}–{formatCount(d.velocityMaxFpm)} ft/min.
              </p>
            ) : (
              <p className="mt-3 text-sm text-ink-soft">Duct size not recorded.</p>
            )}
            {r.velocity && r.velocity.status !== 'in-range' && <p className="mt-1 text-xs text-ink-soft">{r.velocity.message}</p>}
            {r.pressure ? (
              <p className="mt-3 text-sm">
                <StateBadge value={r.pressure.status === 'in-range' ? 'pass' : 'fail'} label={r.pressure.status} /> tube difference {r.pressure.measuredInWc} in. w.c.; listed{' '}
                {d.pressureMinInWc}–{d.pressureMaxInWc}.
              </p>
            ) : (
              <p className="mt-3 text-sm text-ink-soft">No tube pressure reading on record.</p>
            )}
          </section>
          <section aria-labelledby="req-h" className="rounded-md border border-line bg-panel p-4">
            <h2 id="req-h" className="font-semibold">
              Required on {d.unitTag} ({d.codeBasis === 'imc' ? 'IMC' : 'NFPA 90A'})
            </h2>
            <ul className="mt-3 space-y-2 text-sm">
              {r.requirements.items.map((i) => (
                <li key={i.location}>
                  <div className="flex flex-wrap items-center justify-between gap-2">
                    <span className="capitalize">{i.location.replaceAll('-', ' ')}</span>
                    <StateBadge
                      value={i.status === 'missing' ? 'fail' : i.status === 'present' ? 'pass' : 'unknown'}
                      label={{ missing: 'Missing', present: 'Present', 'not-required': 'Not required', extra: 'Beyond code' }[i.status]}
                    />
                  </div>
                  <div className="text-xs text-ink-faint">
                    {i.clause}: {i.reason}
                  </div>
                </li>
              ))}
            </ul>
            <p className="mt-3 text-xs font-medium text-soon">{r.requirements.verifyWithAhj}</p>
            {r.siblings.length > 1 && (
              <p className="mt-2 flex flex-wrap items-center gap-x-2 text-xs text-ink-soft">
                Also on this unit:
                {r.siblings
                  .filter((s) => s.id !== d.id)
                  .map((s) => (
                    <Link key={s.id} to={`/devices/${s.id}`} className={`${TAP} font-mono text-accent underline`}>
                      {s.tag}
                    </Link>
                  ))}
              </p>
            )}
          </section>
        </div>
        <div className="min-w-0 space-y-6">
          <section aria-labelledby="interlock-h" className="min-w-0 rounded-md border border-line bg-panel p-4">
            <h2 id="interlock-h" className="font-semibold">
              Unit shutdown ({r.interlock.style})
            </h2>
            <ul className="mt-2 space-y-1.5 text-sm">
              {r.interlock.wiring.map((w) => (
                <li key={w.from} className="flex flex-wrap items-baseline gap-x-2 break-words">
                  <span className="font-mono">{w.from}</span>
                  <span aria-hidden="true" className="text-ink-faint">
                    →
                  </span>
                  <span className="sr-only">to</span>
                  <span className="font-mono">{w.to}</span>
                </li>
              ))}
            </ul>
            <p className="mt-2 text-sm text-ink-soft">
              Expect about {r.interlock.expected.normal.volts} V at the input in normal and {r.interlock.expected.alarm.volts} V in alarm, with the unit stopped.
            </p>
            <ol className="mt-3 list-decimal space-y-1 pl-5 text-sm text-ink-soft">
              {r.interlock.steps.map((s) => (
                <li key={s}>{s}</li>
              ))}
            </ol>
          </section>
          <section aria-labelledby="contacts-h" className="min-w-0 rounded-md border border-line bg-panel">
            <h2 id="contacts-h" className="border-b border-line px-4 py-3 font-semibold">
              Contacts, terminal by terminal
            </h2>
            <div role="region" aria-label="Contacts table" tabIndex={0} data-scroll-x className="overflow-x-auto">
              <table className="w-full text-xs">
                <thead className="text-left text-ink-faint uppercase">
                  <tr>
                    <th className="py-2 pr-2 pl-4 font-medium">Contact</th>
                    {DETECTOR_STATES.map((s) => (
                      <th key={s} className="px-1.5 py-2 font-medium sm:px-2">
                        {s === 'unpowered' ? 'Power off' : s}
                      </th>
                    ))}
                  </tr>
                </thead>
                <tbody>
                  {r.contacts.flatMap((c) =>
                    (['C-NO', 'C-NC'] as const).map((t) => (
                      <tr key={c.contact + t} className="border-t border-line/70">
                        <td className="py-1.5 pr-2 pl-4">
                          {c.label} <span className="font-mono whitespace-nowrap">{t.replace('-', '–')}</span>
                        </td>
                        {DETECTOR_STATES.map((s) => (
                          <td key={s} className={`px-1.5 py-1.5 font-mono sm:px-2 ${c.states[s][t] === 'closed' ? 'font-semibold text-ink' : 'text-ink-faint'}`}>
                            {c.states[s][t]}
                          </td>
                        ))}
                      </tr>
                    )),
                  )}
                </tbody>
              </table>
            </div>
            <p className="px-4 py-3 text-xs text-ink-faint">
              Supervisory marks on this model are printed in the {d.supervisoryLabelledIn} state (common practice; check the device&apos;s instructions).
            </p>
          </section>
        </div>
      </div>

      <section aria-labelledby="events-h" className="rounded-md border border-line bg-panel">
        <h2 id="events-h" className="border-b border-line px-4 py-3 font-semibold">
          History
        </h2>
        <EventTimeline events={r.events} timeZone={d.timeZone} />
      </section>
    </div>
  )
}
