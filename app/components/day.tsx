import { formatDay } from '~/utils/format'

/** A calendar day as people read it ("Mon, 15 Jun 2026"), with the ISO date kept for machines. */
export function Day({ iso, className }: { iso: string; className?: string }) {
  return (
    <time dateTime={iso} className={className}>
      {formatDay(iso)}
    </time>
  )
}
