import { Link } from 'react-router'
import { EditLink } from '~/components/forms/edit-link'
import { requireUser } from '~/.server/auth'
import { getDb } from '~/.server/db'
import { customerRecord } from '~/.server/repos/customer'
import { pageNotFound, pageRecordId } from '~/.server/repos/record-id'
import { officeToday } from '~/.server/today'
import { Caution } from '~/components/caution'
import { StateBadge } from '~/components/state-badge'
import type { RouteAccess } from '~/domain/permissions'
import { formatCount, formatDay, percent } from '~/utils/format'
import type { Route } from './+types/_app.customers.$customerId'
import { Figure } from '~/components/ui/facts'
import { TAP, TAP_AREA } from '~/components/ui/tap'

export const handle = { access: { loader: 'view:fleet' } satisfies RouteAccess }

export const meta: Route.MetaFunction = ({ data }) => [
  { title: data ? `${data.customer.name} · Ductkeeper` : 'Customer · Ductkeeper' },
]

// The same repo call as /api/customers/:id, so the page and the API show the same figures.
export async function loader({ request, params }: Route.LoaderArgs) {
  await requireUser(request, 'view:fleet')
  const record = customerRecord(getDb(), pageRecordId(params, 'customerId', 'customer'), officeToday())
  if (!record) throw pageNotFound('customer')
  return record
}

const KIND_LABELS: Record<string, string> = {
  restaurant: 'Restaurant group',
  retail: 'Retail',
  office: 'Offices',
  school: 'Schools',
  healthcare: 'Healthcare',
}

// Long-neglected detectors run to thousands of days, which nobody reads at a glance.
function overdueWords(days: number) {
  if (days < 90) return `${days} ${days === 1 ? 'day' : 'days'}`
  if (days < 730) return `${Math.round(days / 30.44)} months`
  return `${(days / 365.25).toFixed(1)} years`
}

export default function Customer({ loaderData }: Route.ComponentProps) {
  const { customer: c, totals: t, dueWork, sites, today } = loaderData
  return (
    <div className="mx-auto max-w-6xl space-y-6">
      <header>
        <p className="text-sm text-ink-faint">Customer · {KIND_LABELS[c.kind] ?? c.kind}</p>
        <div className="mt-1 flex flex-wrap items-baseline justify-between gap-x-4 gap-y-1">
          <h1 className="text-2xl font-semibold break-words">{c.name}</h1>
          <p className="text-sm text-ink-faint">Figures as of {formatDay(today)}</p>
        </div>
        {/* On a phone each detail has its own 44 px line, so the two links stack evenly instead of wrapping
            with a gap; from sm up they sit on one line. */}
        <p className="mt-1 flex flex-col items-start text-sm text-ink-soft sm:flex-row sm:flex-wrap sm:items-center sm:gap-x-3">
          <span className="flex min-h-11 items-center sm:min-h-0">{c.contactName ?? 'No contact on record'}</span>
          {c.contactPhone && (
            <a href={`tel:${c.contactPhone}`} className={`${TAP} font-mono text-accent hover:underline`}>
              {c.contactPhone}
            </a>
          )}
          {c.contactEmail && (
            <a href={`mailto:${c.contactEmail}`} className={`${TAP} break-all hover:underline`}>
              {c.contactEmail}
            </a>
          )}
        </p>
        <div className="mt-3">
          <EditLink to={`/customers/${c.id}/edit`} what="customer" />
        </div>
      </header>

      <section aria-label="Totals" className="grid grid-cols-2 gap-3 sm:grid-cols-4">
        <Figure label="Sites" value={t.sites} href={`/sites?customer=${c.id}`} />
        {/* There is no fleet list of units: each site's row counts its units. */}
        <Figure label="Units" value={t.units} href={`/sites?customer=${c.id}`} />
        <Figure label="Detectors" value={t.detectors} href={`/devices?customer=${c.id}`} />
        <Figure label="Overdue" value={t.overdue} note={`${percent(t.overdue, t.detectors)} of detectors`} tone="text-late" href={`/devices?customer=${c.id}&due=overdue`} />
        <Figure label="Due within 30 days" value={t.dueSoon} tone="text-soon" href={`/devices?customer=${c.id}&due=due-soon`} />
        <Figure label="In trouble" value={t.inTrouble} tone="text-trouble" href={`/devices?customer=${c.id}&state=trouble`} />
        <Figure label="Out of service" value={t.outOfService} href={`/devices?customer=${c.id}&state=out-of-service`} />
        <Figure label="Delay differs from policy" value={t.delayDisagrees} tone="text-late" href={`/devices?customer=${c.id}&delay=disagree`} />
      </section>

      <section aria-labelledby="due-h" className="rounded-md border border-line bg-panel">
        <div className="flex flex-wrap items-baseline justify-between gap-2 border-b border-line px-4 py-3">
          <h2 id="due-h" className="font-semibold">
            Due work: most overdue first
          </h2>
          {dueWork.total === 0 ? (
            <span className="text-xs text-ink-faint">Nothing overdue</span>
          ) : (
            <Link to={`/devices?customer=${c.id}&due=overdue`} className="text-xs text-ink-soft underline decoration-line-strong underline-offset-2 hover:text-ink">
              {`Showing ${formatCount(dueWork.rows.length)} of ${formatCount(dueWork.total)} overdue detectors`} · open the list
            </Link>
          )}
        </div>
        <div className="px-4 pt-3">
          <Caution compact />
        </div>
        {dueWork.rows.length === 0 ? (
          <p className="px-4 py-3 text-sm text-ink-soft">Every detector of {c.name} is within its intervals.</p>
        ) : (
          <div className="overflow-x-auto">
            <table className="mt-2 w-full text-sm">
              <thead className="text-left text-xs text-ink-faint uppercase">
                <tr>
                  <th className="px-4 py-2 font-medium">Detector</th>
                  <th className="hidden px-2 py-2 font-medium sm:table-cell">Unit</th>
                  <th className="hidden px-2 py-2 font-medium sm:table-cell">Site</th>
                  <th className="px-2 py-2 font-medium">Fell due</th>
                  <th className="hidden px-2 py-2 text-right font-medium sm:table-cell">Overdue by</th>
                  <th className="hidden px-2 py-2 font-medium sm:table-cell">State</th>
                  <th className="px-4 py-2 text-right font-medium">Risk</th>
                </tr>
              </thead>
              <tbody>
                {dueWork.rows.map((d) => (
                  <tr key={d.id} className="border-t border-line/70 align-top sm:align-middle">
                    <td className="px-4 py-2">
                      <Link to={`/devices/${d.id}`} className={`${TAP_AREA} font-mono font-medium text-accent hover:underline`}>
                        {d.tag}
                      </Link>
                      <div className="text-xs text-ink-faint sm:hidden">
                        {d.position === 'supply' ? 'Supply' : 'Return'} · {d.unit} · {d.site}
                      </div>
                    </td>
                    <td className="hidden px-2 py-2 whitespace-nowrap sm:table-cell">
                      <span className="font-mono">{d.unit}</span>{' '}
                      <span className="text-xs text-ink-faint">{d.position === 'supply' ? 'supply' : 'return'}</span>
                    </td>
                    <td className="hidden px-2 py-2 sm:table-cell">
                      <Link to={`/sites/${d.siteId}`} className="hover:underline">
                        {d.site}
                      </Link>
                    </td>
                    <td className="px-2 py-2 whitespace-nowrap">
                      <span className="font-mono text-xs">{d.nextDueOn ?? '—'}</span>
                      <div className="space-y-1 sm:hidden">
                        {d.daysOverdue !== null && <div className="text-xs text-late">{overdueWords(d.daysOverdue)} over</div>}
                        {d.state !== 'normal' && <StateBadge value={d.state} />}
                      </div>
                    </td>
                    <td className="hidden px-2 py-2 text-right text-xs whitespace-nowrap text-late sm:table-cell">
                      {d.daysOverdue !== null ? overdueWords(d.daysOverdue) : '—'}
                    </td>
                    <td className="hidden px-2 py-2 sm:table-cell">
                      <StateBadge value={d.state} />
                    </td>
                    <td className="px-4 py-2 text-right font-mono">{d.risk}</td>
                  </tr>
                ))}
              </tbody>
            </table>
          </div>
        )}
      </section>

      <section aria-labelledby="sites-h" className="rounded-md border border-line bg-panel">
        <div className="flex flex-wrap items-baseline justify-between gap-2 border-b border-line px-4 py-3">
          <h2 id="sites-h" className="font-semibold">
            Sites
          </h2>
          <Link to={`/sites?customer=${c.id}`} className="text-xs text-ink-soft underline decoration-line-strong underline-offset-2 hover:text-ink">
            {sites.total > sites.rows.length
              ? `Showing ${formatCount(sites.rows.length)} of ${formatCount(sites.total)}, most overdue first`
              : `${formatCount(sites.total)} ${sites.total === 1 ? 'site' : 'sites'}, most overdue first`}{' '}
            · open the list
          </Link>
        </div>
        {sites.rows.length === 0 ? (
          <p className="px-4 py-3 text-sm text-ink-soft">No sites on record.</p>
        ) : (
          <div className="overflow-x-auto">
            <table className="w-full text-sm">
              <thead className="text-left text-xs text-ink-faint uppercase">
                <tr>
                  <th className="px-4 py-2 font-medium">Site</th>
                  <th className="hidden px-2 py-2 font-medium md:table-cell">City</th>
                  <th className="hidden px-2 py-2 text-right font-medium sm:table-cell">Detectors</th>
                  <th className="px-4 py-2 text-right font-medium sm:px-2">Overdue</th>
                  <th className="hidden px-2 py-2 text-right font-medium sm:table-cell">In trouble</th>
                  <th className="hidden px-4 py-2 font-medium sm:table-cell">Next planned visit</th>
                </tr>
              </thead>
              <tbody>
                {sites.rows.map((s) => (
                  <tr key={s.id} className="border-t border-line/70 align-top">
                    <td className="px-4 py-2">
                      <Link to={`/sites/${s.id}`} className={`${TAP_AREA} font-medium text-accent hover:underline`}>
                        {s.name}
                      </Link>
                      <div className="text-xs text-ink-faint md:hidden">
                        {s.city}
                        <span className="sm:hidden">
                          {` · ${formatCount(s.detectors)} ${s.detectors === 1 ? 'detector' : 'detectors'}`}
                          {s.inTrouble > 0 && ` · ${formatCount(s.inTrouble)} in trouble`}
                          {' · '}
                          {s.nextVisitOn ? <span className="whitespace-nowrap">next visit {s.nextVisitOn}</span> : 'no visit planned'}
                        </span>
                      </div>
                    </td>
                    <td className="hidden px-2 py-2 md:table-cell">{s.city}</td>
                    <td className="hidden px-2 py-2 text-right font-mono sm:table-cell">{formatCount(s.detectors)}</td>
                    <td className={`px-4 py-2 text-right font-mono sm:px-2 ${s.overdue > 0 ? 'font-semibold text-late' : 'text-ink-faint'}`}>
                      {formatCount(s.overdue)}
                    </td>
                    <td
                      className={`hidden px-2 py-2 text-right font-mono sm:table-cell ${s.inTrouble > 0 ? 'font-semibold text-trouble' : 'text-ink-faint'}`}
                    >
                      {formatCount(s.inTrouble)}
                    </td>
                    <td className="hidden px-4 py-2 sm:table-cell">
                      {s.nextVisitOn ? (
                        <>
                          <span className="font-mono text-xs">{s.nextVisitOn}</span>
                          <span className="text-xs text-ink-soft capitalize"> · {s.nextVisitKind}</span>
                        </>
                      ) : (
                        <span className="text-xs text-ink-faint">None planned</span>
                      )}
                    </td>
                  </tr>
                ))}
              </tbody>
            </table>
          </div>
        )}
        {sites.total > sites.rows.length && (
          <p className="border-t border-line px-4 py-2 text-xs text-ink-faint">
            The first {formatCount(sites.rows.length)} sites by overdue detectors are listed; the rest have as many overdue or fewer.
          </p>
        )}
      </section>
    </div>
  )
}
