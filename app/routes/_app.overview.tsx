import { Link } from 'react-router'
import { requireUser } from '~/.server/auth'
import { getDb } from '~/.server/db'
import { overviewFigures } from '~/.server/repos/overview'
import { officeToday } from '~/.server/today'
import { Caution } from '~/components/caution'
import { StateBadge } from '~/components/state-badge'
import type { RouteAccess } from '~/domain/permissions'
import { formatCount, formatDay, percent } from '~/utils/format'
import type { Route } from './+types/_app.overview'
import { Figure } from '~/components/ui/facts'

export const meta: Route.MetaFunction = () => [{ title: 'Overview · Ductkeeper' }]

export const handle = { access: { loader: 'view:fleet' } satisfies RouteAccess }

export async function loader({ request }: Route.LoaderArgs) {
  await requireUser(request, 'view:fleet')
  const today = officeToday()
  return { today, figures: overviewFigures(getDb(), today) }
}

export default function Overview({ loaderData }: Route.ComponentProps) {
  const { figures: f, today } = loaderData
  return (
    <div className="mx-auto max-w-6xl space-y-8">
      <header className="flex flex-wrap items-baseline justify-between gap-2">
        <h1 className="text-2xl font-semibold">Overview</h1>
        <p className="text-sm text-ink-faint">Figures as of {formatDay(today)}</p>
      </header>

      <section aria-label="Fleet" className="grid grid-cols-2 gap-3 sm:grid-cols-3 lg:grid-cols-6">
        <Figure label="Customers" value={f.customers} />
        <Figure label="Sites" value={f.sites} />
        <Figure label="Units" value={f.units} />
        <Figure label="Detectors" value={f.detectors} />
        <Figure
          label="Overdue"
          value={f.overdue}
          note={`${percent(f.overdue, f.detectors)} of detectors`}
          tone="text-late"
        />
        <Figure
          label="In trouble"
          value={f.inTrouble}
          note={`${formatCount(f.outOfService)} out of service`}
          tone="text-trouble"
        />
      </section>

      <div className="grid gap-6 lg:grid-cols-[3fr_2fr]">
        <section aria-labelledby="visits-h" className="rounded-md border border-line bg-panel">
          <h2 id="visits-h" className="border-b border-line px-4 py-3 font-semibold">
            Visits in the next 14 days
          </h2>
          <div className="p-4">
            <Caution compact />
          </div>
          {f.upcomingVisits.length === 0 ? (
            <p className="px-4 pb-4 text-sm text-ink-soft">No visits are planned for the next 14 days.</p>
          ) : (
            <table className="w-full text-sm">
              <thead className="text-left text-xs text-ink-faint uppercase">
                <tr>
                  <th className="px-4 py-2 font-medium">Date</th>
                  <th className="px-2 py-2 font-medium">Site</th>
                  <th className="hidden px-2 py-2 font-medium sm:table-cell">Work</th>
                  <th className="hidden px-2 py-2 font-medium sm:table-cell">Technician</th>
                  <th className="px-4 py-2 text-right font-medium">Detectors</th>
                </tr>
              </thead>
              <tbody>
                {f.upcomingVisits.map((v) => (
                  <tr key={v.id} className="border-t border-line/70">
                    <td className="px-4 py-2 font-mono text-xs whitespace-nowrap">{v.scheduledOn}</td>
                    <td className="px-2 py-2">
                      <div className="font-medium">{v.siteName}</div>
                      <div className="text-xs text-ink-faint">
                        {v.city}
                        <span className="capitalize sm:hidden"> · {v.kind}</span>
                      </div>
                    </td>
                    <td className="hidden px-2 py-2 capitalize sm:table-cell">{v.kind}</td>
                    <td className="hidden px-2 py-2 sm:table-cell">
                      {v.technician ?? <span className="text-late">Not assigned</span>}
                    </td>
                    <td className="px-4 py-2 text-right font-mono">{v.detectors}</td>
                  </tr>
                ))}
              </tbody>
            </table>
          )}
        </section>

        <div className="space-y-6">
          <section aria-labelledby="attn-h" className="rounded-md border border-line bg-panel p-4">
            <h2 id="attn-h" className="font-semibold">
              Needs attention first
            </h2>
            <ol className="mt-3 space-y-1.5 text-sm">
              {f.attention.map((d) => (
                <li key={d.id} className="flex items-center justify-between gap-2">
                  <Link to={`/devices/${d.id}`} className="min-w-0 truncate hover:underline">
                    <span className="font-mono">{d.tag}</span> <span className="text-ink-soft">· {d.siteName}</span>
                  </Link>
                  <span className="flex shrink-0 items-center gap-1.5">
                    <StateBadge value={d.state} />
                    <span className="font-mono text-xs text-ink-soft" title="Risk score">
                      {d.riskScore}
                    </span>
                  </span>
                </li>
              ))}
            </ol>
          </section>

          <section aria-labelledby="due-h" className="rounded-md border border-line bg-panel p-4">
            <h2 id="due-h" className="font-semibold">
              Work falling due
            </h2>
            <dl className="mt-3 space-y-2 text-sm">
              <Row label={<StateBadge value="overdue" />} value={f.overdue} />
              <Row label={<StateBadge value="due-soon" label="Due within 30 days" />} value={f.dueSoon} />
              <Row label={<StateBadge value="disagree" label="Delay differs from policy" />} value={f.delayDisagrees} />
            </dl>
          </section>

          <section aria-labelledby="cust-h" className="rounded-md border border-line bg-panel p-4">
            <h2 id="cust-h" className="font-semibold">
              Most overdue customers
            </h2>
            <ol className="mt-3 space-y-2 text-sm">
              {f.worstCustomers.map((c) => (
                <li key={c.id} className="flex items-baseline justify-between gap-3">
                  <span className="truncate">{c.name}</span>
                  <span className="font-mono text-xs whitespace-nowrap text-ink-soft">
                    {formatCount(c.overdue)} of {formatCount(c.detectors)}
                  </span>
                </li>
              ))}
            </ol>
          </section>

          <section aria-labelledby="env-h" className="rounded-md border border-line bg-panel p-4">
            <h2 id="env-h" className="font-semibold">
              By location
            </h2>
            <ul className="mt-3 space-y-2 text-sm">
              {f.byEnvironment.map((e) => (
                <li key={e.environment}>
                  <div className="flex justify-between">
                    <span className="capitalize">{e.environment}</span>
                    <span className="font-mono text-xs text-ink-soft">
                      {formatCount(e.detectors)} · {percent(e.overdue, e.detectors)} overdue
                    </span>
                  </div>
                  <div className="mt-1 h-1.5 rounded-full bg-sunken" aria-hidden="true">
                    <div
                      className="h-1.5 rounded-full bg-accent"
                      style={{ width: `${Math.max(2, (100 * e.detectors) / Math.max(1, f.detectors))}%` }}
                    />
                  </div>
                </li>
              ))}
            </ul>
          </section>
        </div>
      </div>
    </div>
  )
}


function Row({ label, value }: { label: React.ReactNode; value: number }) {
  return (
    <div className="flex items-center justify-between gap-3">
      <dt>{label}</dt>
      <dd className="font-mono">{formatCount(value)}</dd>
    </div>
  )
}
