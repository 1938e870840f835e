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

/** A headline count; `tone` colours it only when there is something to see. */
export function Figure({ label, value, note, tone }: { label: string; value: number; note?: string; tone?: string }) {
  return (
    <div className="rounded-md border border-line bg-panel px-3 py-2 sm:px-4 sm:py-3">
      <div className="text-xs font-medium text-ink-faint uppercase">{label}</div>
      <div className={`mt-1 font-mono text-xl font-semibold tabular-nums sm:text-2xl ${value > 0 && tone ? tone : ''}`}>{formatCount(value)}</div>
      {note && <div className="text-xs text-ink-faint">{note}</div>}
    </div>
  )
}
