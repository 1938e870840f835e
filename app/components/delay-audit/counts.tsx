import { Link } from 'react-router'
import { formatCount, percent } from '~/utils/format'

const OUTCOMES = [
  { key: 'agree', label: 'Agree with the policy', tone: 'text-ok' },
  { key: 'disagree', label: 'Disagree', tone: 'text-late' },
  { key: 'unknown', label: 'Never recorded', tone: 'text-soon' },
] as const

/** The fleet's counts per outcome: each opens the Detectors list so filtered, or this page's own table. */
export function AuditCounts(p: { counts: Record<(typeof OUTCOMES)[number]['key'], number> & { total: number }; outcome: string }) {
  return (
    <section aria-label="Counts per outcome" className="grid grid-cols-1 gap-3 sm:grid-cols-3">
      {OUTCOMES.map((o) => (
        <div
          key={o.key}
          data-outcome={o.key}
          className={`rounded-md border bg-panel p-4 ${p.outcome === o.key ? 'border-accent ring-1 ring-accent' : 'border-line'}`}
        >
          <p className="text-sm text-ink-soft">{o.label}</p>
          <p className={`text-3xl font-semibold tabular-nums ${o.tone}`}>
            <Link to={`/devices?delay=${o.key}`} aria-label={`${formatCount(p.counts[o.key])} detectors: ${o.label}, in the Detectors list`}>
              {formatCount(p.counts[o.key])}
            </Link>
          </p>
          <p className="mt-1 flex flex-wrap justify-between gap-2 text-xs text-ink-faint">
            <span>{percent(p.counts[o.key], p.counts.total)} of {formatCount(p.counts.total)}</span>
            <Link className="inline-flex min-h-6 items-center text-accent underline" to={`?outcome=${o.key}`}>
              {p.outcome === o.key ? 'Shown below' : 'Show by site'}
            </Link>
          </p>
        </div>
      ))}
    </section>
  )
}
