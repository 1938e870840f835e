import { Link } from 'react-router'
import { Breadcrumb } from '~/components/breadcrumb'
import { EditLink } from '~/components/forms/edit-link'
import { requireUser } from '~/.server/auth'
import { getDb } from '~/.server/db'
import { pageNotFound, pageRecordId } from '~/.server/repos/record-id'
import { siteRecord } from '~/.server/repos/site'
import { officeToday } from '~/.server/today'
import { Caution } from '~/components/caution'
import { BookVisit } from '~/components/visit/book-visit'
import { EventTimeline } from '~/components/event-timeline'
import { StateBadge } from '~/components/state-badge'
import type { RouteAccess } from '~/domain/permissions'
import { formatCount, formatDay } from '~/utils/format'
import { delayLimitCaution } from '~/domain/delay-audit'
import type { Route } from './+types/_app.sites.$siteId'
import { Fact } from '~/components/ui/facts'
import { TAP, TAP_AREA } from '~/components/ui/tap'
import { siteDateTime, siteDay, siteTime } from '~/utils/time-format'

export const handle = { access: { loader: 'view:fleet' } satisfies RouteAccess }

export const meta: Route.MetaFunction = ({ data }) => [
  { title: data ? `${data.site.name} · ${data.customer.name} · Ductkeeper` : 'Site · Ductkeeper' },
]

// The same repo call as /api/sites/:id, so the page and the API show the same figures.
export async function loader({ request, params }: Route.LoaderArgs) {
  await requireUser(request, 'view:fleet')
  const record = siteRecord(getDb(), pageRecordId(params, 'siteId', 'site'), officeToday())
  if (!record) throw pageNotFound('site')
  return { ...record, now: new Date().toISOString() }
}

type Monitoring = NonNullable<Route.ComponentProps['loaderData']['monitoring']>

const CODE_BASIS = { imc: 'International Mechanical Code (IMC)', nfpa90a: 'NFPA 90A' } as const
const METHOD = { phone: 'By phone', email: 'By e-mail', portal: 'Through their online portal' } as const
const METHOD_SHORT = { phone: 'Phone', email: 'E-mail', portal: 'Portal' } as const
const delayWords = (s: number) => (s === 0 ? 'Report at once (no delay)' : `Report after a ${s / 60} min delay`)

// A time on the same site day as the one before it needs no date again; the zone's letters stay.
const clockAfter = (iso: string, ref: string, timeZone: string) =>
  siteDay(iso, timeZone) === siteDay(ref, timeZone) ? siteTime(iso, timeZone) : siteDateTime(iso, timeZone)

export default function Site({ loaderData }: Route.ComponentProps) {
  const { site: s, customer, monitoring: mc, units, detectors, upcomingVisits: visits, notifications, events, now } = loaderData
  const policyCaution = delayLimitCaution({ policySeconds: s.delayPolicySeconds })
  const tz = s.timeZone
  return (
    <div className="mx-auto max-w-6xl space-y-6">
      <header>
        <Breadcrumb items={[{ to: `/customers/${customer.id}`, name: customer.name }]} here="Site" />
        <h1 className="mt-1 text-2xl font-semibold">{s.name}</h1>
        <p className="mt-1 text-sm text-ink-soft">
          {s.street}, {s.city} {s.postalCode} · {formatCount(units.total)} {units.total === 1 ? 'unit' : 'units'},{' '}
          {formatCount(detectors.total)} {detectors.total === 1 ? 'detector' : 'detectors'}
        </p>
        <div className="mt-3 flex flex-wrap items-center gap-x-4 gap-y-2 [&>button]:min-h-11 sm:[&>button]:min-h-0">
          <BookVisit siteId={s.id} detectors={detectors.rows.map((d) => ({ id: d.id, tag: d.tag }))} what={s.name} />
          <Link to={`/sites/${s.id}/record`} className={`${TAP} text-sm text-ink-soft underline decoration-line-strong underline-offset-2 hover:text-ink`}>
            Inspection record
          </Link>
          <Link to={`/sites/${s.id}/labels`} className={`${TAP} text-sm text-ink-soft underline decoration-line-strong underline-offset-2 hover:text-ink`}>
            Detector labels with QR codes
          </Link>
          <EditLink to={`/sites/${s.id}/edit`} what="site" />
        </div>
      </header>

      <section aria-labelledby="before-h" className="rounded-md border border-soon/40 bg-panel p-3 sm:p-4">
        <h2 id="before-h" className="font-semibold">
          Before work at this site
        </h2>
        <div className="mt-3">
          <Caution />
        </div>
        {mc ? (
          <ol className="mt-3 list-decimal space-y-1 pl-5 text-sm">
            <li>
              <NoticeStep mc={mc} account={s.monitoringAccount} />
            </li>
            <li>Ask for the system to be placed in test, and note who you spoke with, the window and any confirmation number.</li>
            <li>Tell site management before a unit is powered down or a detector is tripped.</li>
            <li>When the work is done, have the system taken out of test and confirm it shows normal.</li>
          </ol>
        ) : (
          <p className="mt-3 text-sm font-medium text-late">
            No monitoring company is on record for this site. Find out who monitors the fire alarm system before any work.
          </p>
        )}
      </section>

      <div className="grid gap-6 lg:grid-cols-2">
        <section aria-labelledby="site-h" className="rounded-md border border-line bg-panel p-4">
          <h2 id="site-h" className="font-semibold">
            Site
          </h2>
          <dl className="mt-3 grid grid-cols-[auto_minmax(0,1fr)] gap-x-4 gap-y-1.5 text-sm [&_dd]:[overflow-wrap:anywhere]">
            <Fact label="Address">
              {s.street}, {s.city} {s.postalCode}
            </Fact>
            <Fact label="Time zone">
              {tz.replace(/_/g, ' ')} <span className="text-ink-soft">· {siteTime(now, tz)} there now</span>
            </Fact>
            <Fact label="Region">{s.region}</Fact>
            <Fact label="Jurisdiction">{s.jurisdiction}</Fact>
            <Fact label="AHJ">
              {s.ahjName}
              {s.ahjContact && (
                <span className="block text-ink-soft">
                  {s.ahjContact.includes('@') ? (
                    <a href={`mailto:${s.ahjContact}`} className={`${TAP_AREA} hover:underline`}>
                      {s.ahjContact}
                    </a>
                  ) : (
                    s.ahjContact
                  )}
                </span>
              )}
            </Fact>
            <Fact label="Code basis">{CODE_BASIS[s.codeBasis]}</Fact>
            <Fact label="Nuisance alarms">
              {s.keepsNuisanceRecords ? 'Recorded: ' : 'Not recorded: '}
              <span className="text-ink-soft">
                {s.keepsNuisanceRecords
                  ? 'a detector in range at three sensitivity tests in a row is next tested in 5 years'
                  : 'sensitivity tests stay every other year, as the 5-year interval needs a nuisance-alarm record'}{' '}
                (NFPA 72 14.4.5.3.2)
              </span>
            </Fact>
            <Fact label="Access notes">{s.accessNotes ?? <span className="text-ink-faint">None</span>}</Fact>
          </dl>
        </section>

        <section aria-labelledby="mon-h" className="rounded-md border border-line bg-panel p-4">
          <h2 id="mon-h" className="font-semibold">
            Monitoring
          </h2>
          {mc ? (
            <dl className="mt-3 grid grid-cols-[auto_minmax(0,1fr)] gap-x-4 gap-y-1.5 text-sm [&_dd]:[overflow-wrap:anywhere]">
              <Fact label="Company">{mc.name}</Fact>
              <Fact label="Phone">
                <a href={`tel:${mc.phone}`} className={`${TAP} font-mono text-accent hover:underline`}>
                  {mc.phone}
                </a>
              </Fact>
              <Fact label="E-mail">
                {mc.email ? (
                  <a href={`mailto:${mc.email}`} className={`${TAP_AREA} hover:underline`}>
                    {mc.email}
                  </a>
                ) : (
                  <span className="text-ink-faint">None on record</span>
                )}
              </Fact>
              <Fact label="Wants notice">
                {METHOD[mc.notifyMethod]}, {formatCount(mc.notifyLeadMinutes)} min ahead
              </Fact>
              <Fact label="Hours">{mc.hours}</Fact>
              <Fact label="Account">{s.monitoringAccount ? <span className="font-mono whitespace-nowrap">{s.monitoringAccount}</span> : <span className="text-ink-faint">Not recorded</span>}</Fact>
              <Fact label="Delay policy">
                {delayWords(s.delayPolicySeconds)}
                {policyCaution && (
                  <span className="mt-1 block">
                    <strong className="font-semibold">Caution:</strong> {policyCaution}
                  </span>
                )}
              </Fact>
              {mc.notes && <Fact label="Notes">{mc.notes}</Fact>}
            </dl>
          ) : (
            <p className="mt-3 text-sm text-ink-soft">
              No monitoring company on record. Delay policy: {delayWords(s.delayPolicySeconds).toLowerCase()}.{policyCaution && ` Caution: ${policyCaution}`}
            </p>
          )}
        </section>
      </div>

      <section aria-labelledby="units-h" className="rounded-md border border-line bg-panel">
        <SectionHead id="units-h" title="Units" shown={units.rows.length} total={units.total} />
        <div className="overflow-x-auto">
          <table className="w-full text-sm">
            <thead className="text-left text-xs text-ink-faint uppercase">
              <tr>
                <th className="px-4 py-2 font-medium">Unit</th>
                <th className="hidden px-2 py-2 font-medium sm:table-cell">Kind</th>
                <th className="px-2 py-2 font-medium">Shutdown input</th>
                <th className="hidden px-2 py-2 text-right font-medium sm:table-cell">Supply / return</th>
                <th className="px-4 py-2 text-right font-medium">Detectors</th>
              </tr>
            </thead>
            <tbody>
              {units.rows.map((u) => (
                <tr key={u.id} className="border-t border-line/70 align-top">
                  <td className="px-4 py-2">
                    <Link to={`/units/${u.id}`} className={`${TAP_AREA} font-mono font-medium text-accent hover:underline`}>
                      {u.tag}
                    </Link>
                    {u.location && <div className="text-xs text-ink-faint">{u.location}</div>}
                  </td>
                  <td className="hidden px-2 py-2 uppercase sm:table-cell">{u.kind}</td>
                  <td className="px-2 py-2 whitespace-nowrap">{u.shutdownInput}</td>
                  <td className="hidden px-2 py-2 text-right font-mono text-xs whitespace-nowrap sm:table-cell">
                    {formatCount(u.supplyCfm)} / {formatCount(u.returnCfm)} cfm
                  </td>
                  <td className="px-4 py-2 text-right font-mono">{u.detectors}</td>
                </tr>
              ))}
            </tbody>
          </table>
        </div>
      </section>

      <section aria-labelledby="det-h" className="rounded-md border border-line bg-panel">
        <SectionHead id="det-h" title="Detectors" shown={detectors.rows.length} total={detectors.total} href={`/devices?site=${s.id}`} />
        <div className="overflow-x-auto">
          <table className="w-full text-sm">
            <thead className="text-left text-xs text-ink-faint uppercase">
              <tr>
                <th className="px-4 py-2 font-medium">Detector</th>
                <th className="hidden px-2 py-2 font-medium sm:table-cell">Unit</th>
                <th className="hidden px-2 py-2 font-medium sm:table-cell">Position</th>
                <th className="px-2 py-2 font-medium">State</th>
                <th className="px-2 py-2 font-medium">Due</th>
                <th className="hidden px-2 py-2 font-medium md:table-cell">Next due</th>
                <th className="hidden px-4 py-2 text-right font-medium sm:table-cell">Risk</th>
              </tr>
            </thead>
            <tbody>
              {detectors.rows.map((d) => (
                <tr key={d.id} className="border-t border-line/70 align-top sm:align-middle">
                  <td className="px-4 py-2">
                    <Link to={`/devices/${d.id}`} className={`${TAP_AREA} font-mono font-medium text-accent hover:underline`}>
                      {d.tag}
                    </Link>
                    <div className="text-xs text-ink-faint sm:hidden">
                      {d.position === 'supply' ? 'Supply' : 'Return'} · risk {d.risk}
                    </div>
                  </td>
                  <td className="hidden px-2 py-2 sm:table-cell">
                    <Link to={`/units/${d.unitId}`} className="font-mono hover:underline">
                      {d.unit}
                    </Link>
                  </td>
                  <td className="hidden px-2 py-2 sm:table-cell">{d.position === 'supply' ? 'Supply' : 'Return'}</td>
                  <td className="px-2 py-2">
                    <StateBadge value={d.state} />
                  </td>
                  <td className="px-2 py-2">
                    <StateBadge value={d.due} />
                    {d.nextDueOn && <div className="mt-0.5 font-mono text-xs text-ink-faint md:hidden">{d.nextDueOn}</div>}
                  </td>
                  <td className="hidden px-2 py-2 font-mono text-xs md:table-cell">{d.nextDueOn ?? '—'}</td>
                  <td className="hidden px-4 py-2 text-right font-mono sm:table-cell">{d.risk}</td>
                </tr>
              ))}
            </tbody>
          </table>
        </div>
      </section>

      <section aria-labelledby="visits-h" className="rounded-md border border-line bg-panel">
        <SectionHead id="visits-h" title="Upcoming visits" shown={visits.rows.length} total={visits.total} href={`/visits?site=${s.id}&status=planned,notified`} />
        {visits.rows.length === 0 ? (
          <p className="px-4 py-3 text-sm text-ink-soft">No visits planned.</p>
        ) : (
          <>
            <div className="px-4 pt-3">
              <Caution compact />
            </div>
            <div className="overflow-x-auto">
              <table className="mt-2 w-full text-sm">
                <thead className="text-left text-xs text-ink-faint uppercase">
                  <tr>
                    <th className="px-4 py-2 font-medium">Date</th>
                    <th className="px-2 py-2 font-medium">Work</th>
                    <th className="hidden px-2 py-2 font-medium sm:table-cell">Status</th>
                    <th className="hidden px-2 py-2 font-medium sm:table-cell">Technician</th>
                    <th className="px-4 py-2 text-right font-medium">Detectors</th>
                  </tr>
                </thead>
                <tbody>
                  {visits.rows.map((v) => (
                    <tr key={v.id} className="border-t border-line/70 align-top sm:align-middle">
                      <td className="px-4 py-2 whitespace-nowrap">
                        <Link to={`/visits/${v.id}`} className={`${TAP_AREA} font-mono text-xs text-accent hover:underline`}>
                          {v.scheduledOn}
                        </Link>{' '}
                        <span className="text-xs text-ink-faint">{formatDay(v.scheduledOn).slice(0, 3)}</span>
                      </td>
                      <td className="px-2 py-2">
                        <span className="capitalize">{v.kind}</span>
                        <div className="text-xs text-ink-faint sm:hidden">
                          {v.technician ?? 'Not assigned'} · <span className="capitalize">{v.status}</span>
                        </div>
                      </td>
                      <td className="hidden px-2 py-2 sm:table-cell">
                        <StateBadge value={v.status} />
                      </td>
                      <td className="hidden px-2 py-2 sm:table-cell">{v.technician ?? <span className="text-late">Not assigned</span>}</td>
                      <td className="px-4 py-2 text-right font-mono">{v.detectors}</td>
                    </tr>
                  ))}
                </tbody>
              </table>
            </div>
          </>
        )}
      </section>

      <section aria-labelledby="notif-h" className="rounded-md border border-line bg-panel">
        <SectionHead id="notif-h" title="Notification history" shown={notifications.rows.length} total={notifications.total} />
        {notifications.rows.length === 0 ? (
          <p className="px-4 py-3 text-sm text-ink-soft">No notifications recorded.</p>
        ) : (
          <>
            <div
              aria-hidden="true"
              className="hidden gap-x-4 px-4 py-2 text-xs font-medium text-ink-faint uppercase md:grid md:grid-cols-[12rem_1fr_1fr_11rem]"
            >
              <span>Notified</span>
              <span>Told</span>
              <span>In test</span>
              <span>Cleared</span>
            </div>
            <ol className="divide-y divide-line/70 border-t border-line/70 text-sm md:border-t-0">
              {notifications.rows.map((n) => (
                <li key={n.id} className="grid gap-x-4 gap-y-1 px-4 py-2.5 break-words md:grid-cols-[12rem_1fr_1fr_11rem]">
                  <div>
                    <span className="font-mono text-xs">{siteDateTime(n.notifiedAt, tz)}</span>
                    <div className="text-xs text-ink-faint">by {n.notifiedBy ?? 'someone not on record'}</div>
                  </div>
                  <div>
                    {METHOD_SHORT[n.method]} · spoke with {n.spokeWith}
                    <div className="text-xs text-ink-faint">
                      {n.monitoring ?? 'Monitoring company not recorded'}
                      {' · '}
                      {n.confirmation ? (
                        <>
                          confirmation <span className="font-mono">{n.confirmation}</span>
                        </>
                      ) : (
                        'no confirmation number'
                      )}
                    </div>
                  </div>
                  <div>
                    <span className="md:hidden">In test </span>
                    <span className="font-mono text-xs">
                      {clockAfter(n.inTestFrom, n.notifiedAt, tz)}–{clockAfter(n.inTestUntil, n.inTestFrom, tz)}
                    </span>
                    <div className="text-xs text-ink-faint">Site told: {n.siteContactTold ?? 'not recorded'}</div>
                  </div>
                  <div>
                    {n.clearedAt ? (
                      <StateBadge value="done" label={`Cleared ${clockAfter(n.clearedAt, n.inTestFrom, tz)}`} />
                    ) : n.inTestUntil > now ? (
                      <StateBadge value="in-progress" label="In test now" />
                    ) : (
                      <StateBadge value="overdue" label="No clear recorded" />
                    )}
                  </div>
                </li>
              ))}
            </ol>
            <p className="border-t border-line/70 px-4 py-2 text-xs text-ink-faint">Times in site time ({tz.replace(/_/g, ' ')}), with the zone beside each.</p>
          </>
        )}
      </section>

      <section aria-labelledby="events-h" className="rounded-md border border-line bg-panel">
        <div className="flex flex-wrap items-baseline justify-between gap-2 border-b border-line px-4 py-3">
          <h2 id="events-h" className="font-semibold">
            Event timeline
          </h2>
          <span className="text-xs text-ink-faint">
            {events.total > events.rows.length
              ? `Latest ${formatCount(events.rows.length)} of ${formatCount(events.total)}`
              : `All ${formatCount(events.total)}`}
          </span>
        </div>
        <EventTimeline events={events.rows} timeZone={tz} />
      </section>
    </div>
  )
}

// Each company says how it wants to hear of work; the first step reads the way they asked for it.
function NoticeStep({ mc, account }: { mc: Monitoring; account: string | null }) {
  const lead = `at least ${formatCount(mc.notifyLeadMinutes)} minutes before work starts`
  const quoting = account ? (
    <>
      , quoting account <span className="font-mono whitespace-nowrap">{account}</span>
    </>
  ) : null
  const phone = (
    <a href={`tel:${mc.phone}`} className={`${TAP_AREA} font-mono font-semibold whitespace-nowrap text-accent hover:underline`}>
      {mc.phone}
    </a>
  )
  if (mc.notifyMethod === 'phone')
    return (
      <>
        Call <span className="font-medium">{mc.name}</span> on {phone} {lead}
        {quoting}.
      </>
    )
  if (mc.notifyMethod === 'email' && mc.email)
    return (
      <>
        E-mail <span className="font-medium">{mc.name}</span> at{' '}
        <a href={`mailto:${mc.email}`} className="font-semibold text-accent hover:underline">
          {mc.email}
        </a>{' '}
        {lead}
        {quoting}. Their number: {phone}.
      </>
    )
  return (
    <>
      {mc.notifyMethod === 'portal' ? 'Log the work in the online portal of ' : 'Tell '}
      <span className="font-medium">{mc.name}</span> {lead}
      {quoting}. Their number: {phone}.
    </>
  )
}

/** A section's title and count; where a list shows them all, the count opens it. */
function SectionHead({ id, title, shown, total, href }: { id: string; title: string; shown: number; total: number; href?: string }) {
  const count = total > shown ? `Showing ${formatCount(shown)} of ${formatCount(total)}` : formatCount(total)
  return (
    <div className="flex flex-wrap items-baseline justify-between gap-2 border-b border-line px-4 py-3">
      <h2 id={id} className="font-semibold">
        {title}
      </h2>
      {href ? (
        <Link to={href} className="text-xs text-ink-soft underline decoration-line-strong underline-offset-2 hover:text-ink">
          {count} · open the list
        </Link>
      ) : (
        <span className="text-xs text-ink-faint">{count}</span>
      )}
    </div>
  )
}
