import { Link } from 'react-router'
import { formatCount } from '~/utils/format'

/** One label/value pair of a record's facts, inside a `<dl>` grid. */
export function Fact({ label, children }: { label: string; children: React.ReactNode }) {
  return (
    <>
      <dt className="text-ink-faint">{label}</dt>
      <dd className="min-w-0">{children}</dd>
    </>
  )
}

/** A headline count; `tone` colours it only when there is something to see. With `href` the whole tile opens the list it counts. */
export function Figure({ label, value, note, tone, href }: { label: string; value: number; note?: string; tone?: string; href?: string }) {
  const body = (
    <>
      <div className="text-xs font-medium text-ink-faint uppercase">{label}</div>
      <div className={`mt-1 font-mono text-xl font-semibold tabular-nums sm:text-2xl ${value > 0 && tone ? tone : ''}`}>{formatCount(value)}</div>
      {note && <div className="text-xs text-ink-faint">{note}</div>}
    </>
  )
  const box = 'rounded-md border border-line bg-panel px-3 py-2 sm:px-4 sm:py-3'
  return href ? (
    <Link to={href} className={`${box} block hover:border-accent`}>
      {body}
    </Link>
  ) : (
    <div className={box}>{body}</div>
  )
}
