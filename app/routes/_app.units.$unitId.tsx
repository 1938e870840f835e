import { Link } from 'react-router'
import { Breadcrumb } from '~/components/breadcrumb'
import { EditLink } from '~/components/forms/edit-link'
import { requireUser } from '~/.server/auth'
import { getDb } from '~/.server/db'
import { pageNotFound, pageRecordId } from '~/.server/repos/record-id'
import { unitRecord } from '~/.server/repos/unit'
import { BookVisit } from '~/components/visit/book-visit'
import { Caution } from '~/components/caution'
import { StateBadge } from '~/components/state-badge'
import type { RouteAccess } from '~/domain/permissions'
import { CONTROL_VOLTS } from '~/domain/power'
import { formatCount } from '~/utils/format'
import type { Route } from './+types/_app.units.$unitId'
import { Fact } from '~/components/ui/facts'
import { TAP, TAP_AREA } from '~/components/ui/tap'

export const handle = { access: { loader: 'view:fleet' } satisfies RouteAccess }

export const meta: Route.MetaFunction = ({ data }) => [
  { title: data ? `${data.unit.tag} · ${data.site.name} · Ductkeeper` : 'Unit · Ductkeeper' },
]

// The same repo call as /api/units/:id, so the page and the API show the same figures.
export async function loader({ request, params }: Route.LoaderArgs) {
  await requireUser(request, 'view:fleet')
  const record = unitRecord(getDb(), pageRecordId(params, 'unitId', 'unit'))
  if (!record) throw pageNotFound('unit')
  return record
}

const KIND_LABELS: Record<string, string> = {
  rtu: 'Rooftop unit',
  ahu: 'Air handler',
  mau: 'Make-up air unit',
  erv: 'Energy recovery ventilator',
  fcu: 'Fan coil unit',
}
const STATUS_BADGE = {
  missing: { value: 'fail', label: 'Missing' },
  present: { value: 'pass', label: 'Present' },
  'not-required': { value: 'unknown', label: 'Not required' },
  extra: { value: 'unknown', label: 'Beyond code' },
} as const
const LOCATION_LABELS = { supply: 'Supply duct', return: 'Return duct', 'return-each-storey': 'Return, at each storey' } as const

const fpm = (n: number) => `${formatCount(Math.round(n))} ft/min`
const va = (n: number) => `${Number(n.toFixed(1))} VA`
const volts = (n: number) => `${n.toFixed(1)} V`

export default function Unit({ loaderData }: Route.ComponentProps) {
  const { unit: u, site, customer, monitoring, duct, velocity, interlock, requirements, power } = loaderData
  const { rows: detectors, total: detectorTotal } = loaderData.detectors
  const ductWords = duct
    ? duct.shape === 'round'
      ? `${duct.diameterIn} in round`
      : `${duct.widthIn} × ${duct.heightIn} in rectangular`
    : 'not recorded'
  const stations = detectors.filter((d) => d.stationDrop)
  return (
    <div className="mx-auto max-w-6xl space-y-6">
      <header>
        <Breadcrumb
          items={[
            { to: `/customers/${customer.id}`, name: customer.name },
            { to: `/sites/${site.id}`, name: site.name },
          ]}
          here="Unit"
        />
        <div className="mt-1 flex flex-wrap items-baseline gap-x-3 gap-y-1">
          <h1 className="font-mono text-2xl font-semibold break-all">{u.tag}</h1>
          <span className="text-sm text-ink-soft">{KIND_LABELS[u.kind] ?? u.kind.toUpperCase()}</span>
        </div>
        <p className="mt-1 text-sm text-ink-soft">
          {u.location ?? 'Location not recorded'} · {site.city} · {u.shutdownInput} shutdown input
        </p>
        <div className="mt-3 flex flex-wrap items-center gap-3 [&>button]:min-h-11 sm:[&>button]:min-h-0">
          <BookVisit siteId={site.id} detectors={detectors.map((d) => ({ id: d.id, tag: d.tag }))} what={`unit ${u.tag}`} />
          <EditLink to={`/units/${u.id}/edit`} what="unit" />
        </div>
      </header>

      <div className="grid gap-6 lg:grid-cols-[2fr_3fr]">
        <section aria-labelledby="air-h" className="rounded-md border border-line bg-panel p-4">
          <h2 id="air-h" className="font-semibold">
            Airflow and duct
          </h2>
          <dl className="mt-3 grid grid-cols-[auto_minmax(0,1fr)] gap-x-4 gap-y-1.5 text-sm [&_dd]:break-words">
            <Fact label="Supply">
              <span className="font-mono">{formatCount(u.supplyCfm)} cfm</span>
              {velocity && <span className="text-ink-soft"> · {fpm(velocity.supplyFpm)}</span>}
            </Fact>
            <Fact label="Return">
              <span className="font-mono">{formatCount(u.returnCfm)} cfm</span>
              {velocity && <span className="text-ink-soft"> · {fpm(velocity.returnFpm)}</span>}
            </Fact>
            <Fact label="Duct at detectors">{ductWords}</Fact>
            <Fact label="Storeys served">{u.storeysServed}</Fact>
            {(u.storeysServed > 1 || u.storeyReturnDetectors !== null) && (
              <Fact label="Return detectors, one per storey">{u.storeyReturnDetectors === null ? 'Not recorded' : `${u.storeyReturnDetectors} of ${u.storeysServed} storeys`}</Fact>
            )}
            <Fact label="Shared plenum">{u.sharedPlenum ? 'Yes' : 'No'}</Fact>
            <Fact label="Area detection">{u.areaDetection ? 'Yes, tied to the fire alarm system' : 'No'}</Fact>
            <Fact label="Transformer">{u.transformerVa} VA, 24 VAC</Fact>
          </dl>
          <p className="mt-3 text-xs text-ink-faint">Velocity = cfm ÷ duct area (ft²), in the recorded inside size.</p>
        </section>

        <section aria-labelledby="det-h" className="rounded-md border border-line bg-panel">
          <div className="flex flex-wrap items-baseline justify-between gap-2 border-b border-line px-4 py-3">
            <h2 id="det-h" className="font-semibold">
              Detectors on {u.tag}
            </h2>
            <Link to={`/devices?unit=${u.id}`} className="text-xs text-ink-soft underline decoration-line-strong underline-offset-2 hover:text-ink">
              {detectorTotal > detectors.length ? `Showing ${formatCount(detectors.length)} of ${formatCount(detectorTotal)}` : formatCount(detectorTotal)} · open the list
            </Link>
          </div>
          {detectors.length === 0 ? (
            <p className="px-4 py-3 text-sm text-ink-soft">No detectors recorded on this unit.</p>
          ) : (
            <ul className="divide-y divide-line/70 text-sm">
              {detectors.map((d) => (
                <li key={d.id} className="flex flex-wrap items-center justify-between gap-x-3 gap-y-1.5 px-4 py-2.5">
                  <div className="min-w-0">
                    <Link to={`/devices/${d.id}`} className={`${TAP_AREA} font-mono font-medium text-accent hover:underline`}>
                      {d.tag}
                    </Link>
                    <div className="text-xs text-ink-faint">
                      {d.position === 'supply' ? 'Supply' : 'Return'} · {d.model}
                    </div>
                  </div>
                  <div className="flex flex-wrap items-center gap-1.5">
                    <StateBadge value={d.state} />
                    <StateBadge value={d.due} />
                    {d.velocity && (
                      <StateBadge
                        value={d.velocity.status === 'in-range' ? 'pass' : 'fail'}
                        label={d.velocity.status === 'in-range' ? 'Airflow in range' : `Airflow ${d.velocity.status}`}
                      />
                    )}
                  </div>
                </li>
              ))}
            </ul>
          )}
        </section>
      </div>

      <section aria-labelledby="interlock-h" className="rounded-md border border-line bg-panel p-4">
        <h2 id="interlock-h" className="font-semibold">
          Shutdown interlock plan ({interlock.style})
        </h2>
        <div className="mt-3">
          <Caution />
        </div>
        {monitoring && (
          <div className="mt-3 flex flex-wrap items-center gap-x-3 gap-y-1 text-sm">
            <span>
              Monitoring for this site: <span className="font-medium">{monitoring.name}</span>
            </span>
            <a href={`tel:${monitoring.phone}`} className={`${TAP} font-mono font-semibold whitespace-nowrap text-accent hover:underline`}>
              {monitoring.phone}
            </a>
            <Link to={`/sites/${site.id}`} className={`${TAP} text-accent underline`}>
              How they want to be told
            </Link>
          </div>
        )}
        <div className="mt-4 grid gap-6 md:grid-cols-[2fr_3fr]">
          <div>
            <h3 className="text-xs font-semibold text-ink-faint uppercase">Wiring (HVAC side only)</h3>
            <ul className="mt-2 space-y-1.5 text-sm">
              {interlock.wiring.map((w) => (
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
            <h3 className="mt-4 text-xs font-semibold text-ink-faint uppercase">Expected at the input</h3>
            <dl className="mt-2 grid grid-cols-[auto_minmax(0,1fr)] gap-x-4 gap-y-1 text-sm">
              <dt className="text-ink-faint">Detector normal</dt>
              <dd>
                <span className="font-mono">about {interlock.expected.normal.volts} V</span>, unit runs
              </dd>
              <dt className="text-ink-faint">Detector in alarm</dt>
              <dd>
                <span className="font-mono">about {interlock.expected.alarm.volts} V</span>, unit stops
              </dd>
            </dl>
          </div>
          <div>
            <h3 className="text-xs font-semibold text-ink-faint uppercase">Steps</h3>
            <ol className="mt-2 list-decimal space-y-1.5 pl-5 text-sm text-ink-soft">
              {interlock.steps.map((s) => (
                <li key={s}>{s}</li>
              ))}
            </ol>
          </div>
        </div>
      </section>

      <div className="grid gap-6 lg:grid-cols-2">
        <section aria-labelledby="req-h" className="rounded-md border border-line bg-panel p-4">
          <h2 id="req-h" className="font-semibold">
            Required detectors ({requirements.codeBasis === 'imc' ? 'IMC' : 'NFPA 90A'})
          </h2>
          <p className="mt-1 text-sm text-ink-soft">
            Against what is installed: supply {detectors.some((d) => d.position === 'supply') ? 'yes' : 'none'}, return{' '}
            {detectors.some((d) => d.position === 'return') ? 'yes' : 'none'}
            {u.storeysServed > 1 && `, at each storey's return ${u.storeyReturnDetectors === null ? 'not recorded' : `${u.storeyReturnDetectors} of ${u.storeysServed}`}`}.
          </p>
          <ul className="mt-3 space-y-3 text-sm">
            {requirements.items.map((i) => (
              <li key={i.location}>
                <div className="flex items-center justify-between gap-2">
                  <span className="font-medium">{LOCATION_LABELS[i.location]}</span>
                  <StateBadge value={STATUS_BADGE[i.status].value} label={STATUS_BADGE[i.status].label} />
                </div>
                <div className="mt-0.5 text-xs text-ink-soft">
                  <span className="font-medium text-ink-faint">{i.clause}:</span> {i.reason}
                </div>
              </li>
            ))}
          </ul>
          <p className="mt-4 text-xs font-medium text-soon">{requirements.verifyWithAhj}</p>
          <p className="mt-1 text-xs text-ink-faint">The site&apos;s AHJ: {site.ahjName}.</p>
        </section>

        <section aria-labelledby="power-h" className="rounded-md border border-line bg-panel p-4">
          <div className="flex flex-wrap items-center justify-between gap-2">
            <h2 id="power-h" className="font-semibold">
              24 VAC power budget
            </h2>
            <StateBadge
              value={power.findings.length === 0 ? 'pass' : 'fail'}
              label={power.findings.length === 0 ? 'Within rating' : 'Needs review'}
            />
          </div>
          <table className="mt-3 w-full text-sm">
            <thead className="text-left text-xs text-ink-faint uppercase">
              <tr>
                <th className="py-1.5 pr-2 font-medium">Load</th>
                <th className="px-2 py-1.5 text-right font-medium">Standby</th>
                <th className="py-1.5 pl-2 text-right font-medium">Alarm</th>
              </tr>
            </thead>
            <tbody className="font-mono text-xs">
              {detectors.map((d) => (
                <tr key={d.id} className="border-t border-line/70">
                  <td className="py-1.5 pr-2">{d.tag}</td>
                  <td className="px-2 py-1.5 text-right">{va(d.standbyVa)}</td>
                  <td className="py-1.5 pl-2 text-right">{va(d.alarmVa)}</td>
                </tr>
              ))}
              <tr className="border-t border-line font-semibold">
                <td className="py-1.5 pr-2 font-sans">Total</td>
                <td className="px-2 py-1.5 text-right">{va(power.standbyVa)}</td>
                <td className="py-1.5 pl-2 text-right">{va(power.alarmVa)}</td>
              </tr>
            </tbody>
          </table>
          <dl className="mt-3 grid grid-cols-[auto_minmax(0,1fr)] gap-x-4 gap-y-1 text-sm [&_dd]:break-words">
            <Fact label="Transformer">{va(power.ratingVa)}</Fact>
            <Fact label="Headroom">
              <span className={power.headroomVa < 0 ? 'font-semibold text-late' : ''}>{va(power.headroomVa)}</span>
            </Fact>
            <Fact label="Alarm current">{power.currentA.toFixed(2)} A at {CONTROL_VOLTS} V</Fact>
            <Fact label="Class 2">
              {power.class2LimitVa === null
                ? 'Not covered above 30 V'
                : `${power.withinClass2 ? 'Within' : 'Beyond'} the ${va(power.class2LimitVa)} limit at ${CONTROL_VOLTS} V`}{' '}
              <span className="text-xs text-ink-faint">({power.class2Source})</span>
            </Fact>
          </dl>
          {power.findings.length > 0 && (
            <ul className="mt-3 space-y-1.5 text-sm">
              {power.findings.map((f) => (
                <li key={f} className="text-late">
                  {f}
                </li>
              ))}
            </ul>
          )}
          <p className="mt-3 text-xs text-ink-faint">
            The unit&apos;s own controls draw from this transformer too; their load is not on record, so keep headroom. Remote
            test stations have no draw on record and are not counted.
          </p>

          <h3 className="mt-4 text-xs font-semibold text-ink-faint uppercase">Voltage at remote test stations</h3>
          {stations.length === 0 ? (
            <p className="mt-2 text-sm text-ink-soft">No remote test station with a recorded distance on this unit.</p>
          ) : (
            <ul className="mt-2 space-y-2 text-sm">
              {stations.map((d) =>
                d.stationDrop ? (
                  <li key={d.id}>
                    <span className="font-mono">{d.tag}</span>: {d.testStation} station {formatCount(d.testStationFeet ?? 0)} ft away on{' '}
                    {d.conductorAwg} AWG {d.conductorStranded ? 'stranded' : 'solid'}, about{' '}
                    <span className="font-mono font-semibold">{volts(d.stationDrop.endVolts)}</span> at the station (drop{' '}
                    {d.stationDrop.dropV.toFixed(2)} V, {d.stationDrop.percent.toFixed(1)}%).
                  </li>
                ) : null,
              )}
            </ul>
          )}
          {stations.length > 0 && (
            <p className="mt-2 text-xs text-ink-faint">
              Worked out at the detector&apos;s full alarm current, the most the run could carry (NEC Chapter 9 Table 8, 75 °C). Compare
              with the station&apos;s listed minimum voltage.
            </p>
          )}
        </section>
      </div>
    </div>
  )
}
