import { Link } from 'react-router'
import { requireUser } from '~/.server/auth'
import { getDb } from '~/.server/db'
import { deviceReport } from '~/.server/device-report'
import { pageNotFound, pageRecordId } from '~/.server/repos/record-id'
import { officeToday } from '~/.server/today'
import { openVisitsOfDetector } from '~/.server/repos/visit-field'
import { BookVisit } from '~/components/visit/book-visit'
import { Caution } from '~/components/caution'
import { EventTimeline } from '~/components/event-timeline'
import { StateBadge } from '~/components/state-badge'
import { WiringDiagram } from '~/components/wiring-diagram'
import { DETECTOR_STATES, STATE_LABELS } from '~/domain/contacts'
import type { Expected, Reading } from '~/domain/loop'
import type { RouteAccess } from '~/domain/permissions'
import { TASK_LABELS } from '~/domain/schedule'
import { formatCount, formatDay } from '~/utils/format'
import type { Route } from './+types/_app.devices.$deviceId'
import { Fact } from '~/components/ui/facts'

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
  return { report, today, openVisits: openVisitsOfDetector(getDb(), id) }
}

const ohms = (n: number) => `${formatCount(Math.round(n * 10) / 10)} Ω`
const showExpected = (e: Expected) => ('open' in e ? 'open (over-range)' : e.min === 0 ? `short, ≤ ${ohms(e.max)}` : `${ohms(e.min)} – ${ohms(e.max)}`)
const showReading = (r: Reading | undefined) => (r === undefined ? '—' : r === 'open' ? 'open' : ohms(r))
const delayWords = (s: number | null) => (s === null ? 'not recorded' : s === 0 ? 'report at once' : `${s / 60} min delay`)

function fits(e: Expected, r: Reading | undefined): boolean | null {
  if (r === undefined) return null
  if ('open' in e) return r === 'open'
  return r !== 'open' && r >= e.min && r <= e.max
}

export default function Device({ loaderData }: Route.ComponentProps) {
  const { report: r, today } = loaderData
  const d = r.device
  const faultCodes = new Set(r.loop.findings.filter((f) => f.state === null).map((f) => f.code))
  return (
    <div className="mx-auto max-w-6xl space-y-6">
      <header>
        <nav aria-label="Breadcrumb" className="text-sm text-ink-faint">
          <Link to={`/customers/${d.customerId}`} className="text-ink-soft underline decoration-line-strong underline-offset-2 hover:text-ink">
            {d.customerName}
          </Link>
          {' · '}
          <Link to={`/sites/${d.siteId}`} className="text-ink-soft underline decoration-line-strong underline-offset-2 hover:text-ink">
            {d.siteName}
          </Link>
          {' · '}
          <Link to={`/units/${d.unitId}`} className="text-ink-soft underline decoration-line-strong underline-offset-2 hover:text-ink">
            {d.unitTag}
          </Link>
        </nav>
        <div className="mt-1 flex flex-wrap items-center gap-3">
          <h1 className="font-mono text-2xl font-semibold">{d.tag}</h1>
          <StateBadge value={d.state} />
          <StateBadge value={r.schedule[0].status} />
          <StateBadge value={r.loop.verdict} label={`Loop: ${r.loop.verdict}`} />
          <span className="text-sm text-ink-soft">
            Risk {r.risk.score}
            {r.risk.reasons.length > 0 && ` · ${r.risk.reasons[0].text}`}
          </span>
        </div>
        <p className="mt-1 text-sm text-ink-soft">
          {d.position === 'supply' ? 'Supply' : 'Return'} duct of {d.unitKind.toUpperCase()} {d.unitTag}
          {d.unitLocation && ` (${d.unitLocation})`} · {d.street}, {d.city} · {d.modelName}
        </p>
        <section aria-label="Open visits" className="mt-3 flex flex-wrap items-center gap-x-3 gap-y-2 text-sm">
          {loaderData.openVisits.length === 0 ? (
            <span className="text-ink-soft">No open visit.</span>
          ) : (
            loaderData.openVisits.map((v) => (
              <Link key={v.id} to={`/visits/${v.id}`} className="inline-flex items-center gap-1.5 rounded-sm border border-line bg-panel px-2 py-1 hover:border-accent">
                <span className="font-mono text-xs">{v.scheduledOn}</span>
                <span className="capitalize">{v.kind}</span>
                <StateBadge value={v.status} />
              </Link>
            ))
          )}
          <BookVisit siteId={d.siteId} detectors={[{ id: d.id, tag: d.tag }]} what={d.tag} />
        </section>
      </header>

      <Caution />

      <div className="grid gap-6 lg:grid-cols-[3fr_2fr]">
        <section aria-labelledby="plan-h" className="rounded-md border border-line bg-panel p-4">
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

        <section aria-labelledby="facts-h" className="rounded-md border border-line bg-panel p-4">
          <h2 id="facts-h" className="font-semibold">
            Record
          </h2>
          <dl className="mt-3 grid grid-cols-[auto_1fr] gap-x-4 gap-y-1.5 text-sm">
            <Fact label="Heads fitted">{d.headsFitted}</Fact>
            <Fact label="Housing">{d.housing === 'standard' ? 'Standard' : d.housing.toUpperCase().replace('NEMA', 'NEMA ')}</Fact>
            <Fact label="Location">
              <span className="capitalize">{d.environment}</span>
            </Fact>
            <Fact label="Installed">{formatDay(d.installedOn)}</Fact>
            <Fact label="End-of-line">
              {ohms(d.eolOhms)}, {d.eolPlacement === 'through-supervisory' ? 'through supervisory' : 'across the pair'}
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
              {d.monitoringPhone && ` · ${d.monitoringPhone}`}
              {d.monitoringAccount && ` · account ${d.monitoringAccount}`}
            </Fact>
            <Fact label="AHJ">{d.ahjName}</Fact>
          </dl>
          {r.delay.agreement !== 'agree' && <p className="mt-3 text-sm text-ink-soft">{r.delay.action}</p>}
        </section>
      </div>

      <section aria-labelledby="loop-h" className="rounded-md border border-line bg-panel">
        <div className="flex flex-wrap items-baseline justify-between gap-2 border-b border-line px-4 py-3">
          <h2 id="loop-h" className="font-semibold">
            Loop readings across the panel pair
          </h2>
          <span className="text-xs text-ink-faint">
            Measured at the panel end · line {ohms(r.loop.lineOhms)} (NEC Chapter 9 Table 8, 75 °C)
            {r.readings[0] && ` · last taken ${r.readings[0].takenAt.slice(0, 10)}${r.readings[0].takenBy ? ` by ${r.readings[0].takenBy}` : ''}`}
          </span>
        </div>
        <table className="w-full text-sm">
          <thead className="text-left text-xs text-ink-faint uppercase">
            <tr>
              <th className="px-4 py-2 font-medium">Detector state</th>
              <th className="px-2 py-2 font-medium">Expected</th>
              <th className="px-2 py-2 font-medium">Last reading</th>
              <th className="px-4 py-2 font-medium">Fits</th>
            </tr>
          </thead>
          <tbody>
            {DETECTOR_STATES.map((s) => {
              const ok = fits(r.loop.expected[s], r.loopReadings[s])
              return (
                <tr key={s} className="border-t border-line/70">
                  <td className="px-4 py-2">{STATE_LABELS[s]}</td>
                  <td className="px-2 py-2 font-mono text-xs">{showExpected(r.loop.expected[s])}</td>
                  <td className="px-2 py-2 font-mono text-xs">{showReading(r.loopReadings[s])}</td>
                  <td className="px-4 py-2">{ok === null ? <span className="text-ink-faint">not measured</span> : <StateBadge value={ok ? 'pass' : 'fail'} label={ok ? 'Fits' : 'Off'} />}</td>
                </tr>
              )
            })}
          </tbody>
        </table>
        <div className="border-t border-line px-4 py-3">
          {r.loop.findings.length === 0 ? (
            <p className="text-sm text-ink-soft">
              {r.loop.verdict === 'pass' ? 'The readings fit a correctly wired, supervised loop.' : 'No fault in what was measured; normal, alarm and trouble or power-off are all needed to prove the loop.'}
            </p>
          ) : (
            <ul className="space-y-2 text-sm">
              {r.loop.findings.map((f, i) => (
                <li key={i} className="flex gap-2">
                  <StateBadge value="fail" label={f.code} />
                  <span>{f.message}</span>
                </li>
              ))}
            </ul>
          )}
        </div>
      </section>

      <div className="grid gap-6 lg:grid-cols-2">
        <section aria-labelledby="contacts-h" className="overflow-x-auto rounded-md border border-line bg-panel">
          <h2 id="contacts-h" className="border-b border-line px-4 py-3 font-semibold">
            Contacts, terminal by terminal
          </h2>
          <table className="w-full text-xs">
            <thead className="text-left text-ink-faint uppercase">
              <tr>
                <th className="px-4 py-2 font-medium">Contact</th>
                {DETECTOR_STATES.map((s) => (
                  <th key={s} className="px-2 py-2 font-medium capitalize">
                    {s === 'unpowered' ? 'power off' : s}
                  </th>
                ))}
              </tr>
            </thead>
            <tbody>
              {r.contacts.flatMap((c) =>
                (['C-NO', 'C-NC'] as const).map((t) => (
                  <tr key={c.contact + t} className="border-t border-line/70">
                    <td className="px-4 py-1.5">
                      {c.label} <span className="font-mono">{t.replace('-', '–')}</span>
                    </td>
                    {DETECTOR_STATES.map((s) => (
                      <td key={s} className={`px-2 py-1.5 font-mono ${c.states[s][t] === 'closed' ? 'font-semibold text-ink' : 'text-ink-faint'}`}>
                        {c.states[s][t]}
                      </td>
                    ))}
                  </tr>
                )),
              )}
            </tbody>
          </table>
          <p className="px-4 py-3 text-xs text-ink-faint">
            Supervisory marks on this model are printed in the {d.supervisoryLabelledIn} state (common practice; check the device&apos;s instructions).
          </p>
        </section>

        <section aria-labelledby="interlock-h" className="rounded-md border border-line bg-panel p-4">
          <h2 id="interlock-h" className="font-semibold">
            Unit shutdown ({r.interlock.style})
          </h2>
          <ul className="mt-2 space-y-1 text-sm">
            {r.interlock.wiring.map((w) => (
              <li key={w.from}>
                <span className="font-mono">{w.from}</span> → <span className="font-mono">{w.to}</span>
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
      </div>

      <div className="grid gap-6 lg:grid-cols-3">
        <section aria-labelledby="due-h" className="rounded-md border border-line bg-panel p-4">
          <h2 id="due-h" className="font-semibold">
            What falls due
          </h2>
          <ul className="mt-3 space-y-2 text-sm">
            {r.schedule.map((t) => (
              <li key={t.task}>
                <div className="flex items-center justify-between gap-2">
                  <span>{TASK_LABELS[t.task]}</span>
                  <StateBadge value={t.status} label={`${t.status === 'overdue' ? 'Overdue' : 'Due'} ${t.dueOn}`} />
                </div>
                <div className="text-xs text-ink-faint">{t.basis}</div>
              </li>
            ))}
          </ul>
          <p className="mt-3 text-xs text-ink-faint">As of {formatDay(today)}.</p>
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
                <div className="flex items-center justify-between gap-2">
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
            <p className="mt-2 text-xs text-ink-soft">
              Also on this unit:{' '}
              {r.siblings
                .filter((s) => s.id !== d.id)
                .map((s) => (
                  <Link key={s.id} to={`/devices/${s.id}`} className="font-mono text-accent underline">
                    {s.tag}
                  </Link>
                ))}
            </p>
          )}
        </section>
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
