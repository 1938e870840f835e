import { Link } from 'react-router'
import { requireUser } from '~/.server/auth'
import { getDb } from '~/.server/db'
import { overviewFigures } from '~/.server/repos/overview'
import { officeToday } from '~/.server/today'
import { Caution } from '~/components/caution'
import { StateBadge } from '~/components/state-badge'
import type { RouteAccess } from '~/domain/permissions'
import { formatCount, formatDay, percent } from '~/utils/format'
import { addDays } from '~/domain/dates'
import { OPEN_VISIT_STATUSES } from '~/domain/vocabulary'
import type { Route } from './+types/_app.overview'

export const meta: Route.MetaFunction = () => [{ title: 'Overview · Ductkeeper' }]

export const handle = { access: { loader: 'view:fleet' } satisfies RouteAccess }

export async function loader({ request }: Route.LoaderArgs) {
  await requireUser(request, 'view:fleet')
  const today = officeToday()
  // The list behind "Visits in the next 14 days": the same days and open statuses the figure counts.
  const visitsHref = `/visits?${new URLSearchParams({ from: today, to: addDays(today, 14), status: OPEN_VISIT_STATUSES.join(','), sort: 'scheduledOn', dir: 'asc' })}`
  return { today, visitsHref, figures: overviewFigures(getDb(), today) }
}

export default function Overview({ loaderData }: Route.ComponentProps) {
  const { figures: f, today, visitsHref } = loaderData
  return (
    <div className="mx-auto max-w-6xl space-y-8">
      <header className="flex flex-wrap items-baseline justify-between gap-2">
        <h1 className="text-2xl font-semibold">Overview</h1>
        <p className="text-sm text-ink-faint">Figures as of {formatDay(today)}</p>
      </header>

      <section aria-label="Fleet" className="grid grid-cols-2 gap-3 sm:grid-cols-3 lg:grid-cols-6">
        <Tile label="Customers" value={f.customers} href="/customers" />
        <Tile label="Sites" value={f.sites} href="/sites" />
        {/* There is no fleet list of units: the sites list counts each site's units. */}
        <Tile label="Units" value={f.units} href="/sites" />
        <Tile label="Detectors" value={f.detectors} href="/devices" />
        <Tile
          label="Overdue"
          value={f.overdue}
          href="/devices?due=overdue"
          note={`${percent(f.overdue, f.detectors)} of detectors`}
          tone="text-late"
        />
        <Tile
          label="In trouble"
          value={f.inTrouble}
          href="/devices?state=trouble"
          note={{ text: `${formatCount(f.outOfService)} out of service`, href: '/devices?state=out-of-service' }}
          tone="text-trouble"
        />
      </section>

      <div className="grid grid-cols-1 gap-6 lg:grid-cols-[3fr_2fr]">
        <section aria-labelledby="visits-h" className="rounded-md border border-line bg-panel">
          <h2 id="visits-h" className="flex flex-wrap items-baseline justify-between gap-x-3 border-b border-line px-4 py-3 font-semibold">
            Visits in the next 14 days
            <Link to={visitsHref} className="inline-flex min-h-11 items-center text-sm font-normal text-accent underline md:min-h-0">
              All of them in Visits
            </Link>
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
                  <th className="hidden px-4 py-2 text-right font-medium sm:table-cell">Detectors</th>
                </tr>
              </thead>
              <tbody>
                {f.upcomingVisits.map((v) => (
                  <tr key={v.id} className="border-t border-line/70">
                    <td className="px-4 py-2 font-mono text-xs whitespace-nowrap">{v.scheduledOn}</td>
                    <td className="px-2 py-2">
                      <Link to={`/visits/${v.id}`} className="font-medium hover:underline">
                        {v.siteName}
                      </Link>
                      <div className="text-xs text-ink-faint">
                        {v.city}
                        {/* On a phone the site takes the room: its work and detector count go under its name. */}
                        <span className="capitalize sm:hidden"> · {v.kind}</span>
                        <span className="sm:hidden">
                          {' '}
                          · {v.detectors} {v.detectors === 1 ? 'detector' : 'detectors'}
                        </span>
                      </div>
                    </td>
                    <td className="hidden px-2 py-2 capitalize sm:table-cell">{v.kind}</td>
                    <td className="hidden px-2 py-2 sm:table-cell">
                      {v.technician ?? <span className="text-late">Not assigned</span>}
                    </td>
                    <td className="hidden px-4 py-2 text-right font-mono sm:table-cell">{v.detectors}</td>
                  </tr>
                ))}
              </tbody>
            </table>
          )}
        </section>

        <div className="space-y-6">
          <section aria-labelledby="attn-h" className="rounded-md border border-line bg-panel p-4">
            <h2 id="attn-h" className="flex flex-wrap items-baseline justify-between gap-x-3 font-semibold">
              Needs attention first
              <Link to="/triage" className="inline-flex min-h-11 items-center text-sm font-normal text-accent underline md:min-h-0">
                The whole queue in Triage
              </Link>
            </h2>
            <ol className="mt-3 space-y-1.5 text-sm">
              {f.attention.map((d) => (
                <li key={d.id} className="flex items-center justify-between gap-2">
                  <Link to={`/devices/${d.id}`} className="flex min-h-11 min-w-0 items-center hover:underline md:min-h-0">
                    {/* Wraps rather than cutting the site's name short. */}
                    <span className="min-w-0 break-words">
                      <span className="font-mono">{d.tag}</span> <span className="text-ink-soft">· {d.siteName}</span>
                    </span>
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
            <ul className="mt-3 space-y-2 text-sm">
              <Row label={<StateBadge value="overdue" />} value={f.overdue} href="/devices?due=overdue" />
              <Row label={<StateBadge value="due" label="Due, inside the allowed window" />} value={f.dueNow} href="/devices?due=due" />
              <Row label={<StateBadge value="due-soon" label="Due within 30 days" />} value={f.dueSoon} href="/devices?due=due-soon" />
              <Row label={<StateBadge value="disagree" label="Delay differs from policy" />} value={f.delayDisagrees} href="/devices?delay=disagree" />
            </ul>
          </section>

          <section aria-labelledby="cust-h" className="rounded-md border border-line bg-panel p-4">
            <h2 id="cust-h" className="font-semibold">
              Most overdue customers
            </h2>
            <ol className="mt-3 space-y-2 text-sm">
              {f.worstCustomers.map((c) => (
                <li key={c.id}>
                  <Link to={`/devices?customer=${c.id}&due=overdue`} className="flex min-h-11 items-center justify-between gap-3 hover:underline md:min-h-0">
                    <span className="truncate">{c.name}</span>
                    <span className="font-mono text-xs whitespace-nowrap text-ink-soft">
                      {formatCount(c.overdue)} of {formatCount(c.detectors)}
                    </span>
                  </Link>
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
                  <Link to={`/devices?environment=${e.environment}`} className="flex min-h-11 items-center justify-between gap-3 hover:underline md:min-h-0">
                    <span className="capitalize">{e.environment}</span>
                    <span className="font-mono text-xs text-ink-soft">
                      {formatCount(e.detectors)} · {percent(e.overdue, e.detectors)} overdue
                    </span>
                  </Link>
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


function Row({ label, value, href }: { label: React.ReactNode; value: number; href: string }) {
  return (
    <li>
      <Link to={href} className="flex min-h-11 items-center justify-between gap-3 hover:underline md:min-h-0">
        <span>{label}</span>
        <span className="font-mono">{formatCount(value)}</span>
      </Link>
    </li>
  )
}

/** A headline count that opens the list it counts; `tone` colours it only when there is something to see. */
function Tile(p: { label: string; value: number; href?: string; note?: string | { text: string; href: string }; tone?: string }) {
  const note = typeof p.note === 'string' ? { text: p.note, href: undefined } : p.note
  const body = (
    <>
      <span className="block text-xs font-medium text-ink-faint uppercase">{p.label}</span>
      <span className={`mt-1 block font-mono text-xl font-semibold tabular-nums sm:text-2xl ${p.value > 0 && p.tone ? p.tone : ''}`}>{formatCount(p.value)}</span>
    </>
  )
  return (
    <div className={`relative min-w-0 rounded-md border border-line bg-panel px-3 py-2 sm:px-4 sm:py-3 ${p.href ? 'hover:border-accent' : ''}`}>
      {/* The whole tile answers a tap on its count; a note with its own list sits above that. */}
      {p.href ? (
        <Link to={p.href} className="block after:absolute after:inset-0 after:content-['']">
          {body}
        </Link>
      ) : (
        <div>{body}</div>
      )}
      {note &&
        (note.href ? (
          <Link to={note.href} className="relative inline-block text-xs text-ink-faint underline hover:text-ink">
            {note.text}
          </Link>
        ) : (
          <span className="block text-xs text-ink-faint">{note.text}</span>
        ))}
    </div>
  )
}
