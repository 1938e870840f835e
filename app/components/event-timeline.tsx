import { Link } from 'react-router'
import { TAP_AREA } from '~/components/ui/tap'
import { formatDay } from '~/utils/format'
import { siteDay, siteTime } from '~/utils/time-format'

export interface TimelineEvent {
  id: number
  /** ISO-8601 UTC instant. */
  occurredAt: string
  kind: string
  detail: string | null
  by: string | null
  /** Set where the timeline spans several detectors (a site), so each line can name its own. */
  detectorId?: number | null
  detectorTag?: string | null
}

// Each kind reads as a word first; the glyph and its tint only help the eye scan a long day.
const KINDS: Record<string, { label: string; glyph: string; tint: string }> = {
  alarm: { label: 'Alarm', glyph: '◆', tint: 'text-alarm' },
  supervisory: { label: 'Supervisory', glyph: '◇', tint: 'text-alarm' },
  trouble: { label: 'Trouble', glyph: '▲', tint: 'text-trouble' },
  restore: { label: 'Restored', glyph: '✓', tint: 'text-ok' },
  test: { label: 'Test', glyph: '●', tint: 'text-accent' },
  reset: { label: 'Reset', glyph: '↺', tint: 'text-accent' },
  cleaning: { label: 'Cleaning', glyph: '≈', tint: 'text-accent' },
  notice: { label: 'Notice', glyph: '»', tint: 'text-soon' },
  change: { label: 'Record change', glyph: 'Δ', tint: 'text-idle' },
}

const kindOf = (kind: string) => KINDS[kind] ?? { label: kind, glyph: '·', tint: 'text-idle' }

/**
 * Events grouped by calendar day, newest first as given. Days and times are read in `timeZone`
 * (the site's own, where known), because a trouble at 23:30 local belongs to that evening, not to
 * the next UTC day.
 */
export function EventTimeline({ events, timeZone = 'UTC' }: { events: TimelineEvent[]; timeZone?: string }) {
  if (events.length === 0) return <p className="px-4 py-3 text-sm text-ink-soft">Nothing recorded yet.</p>

  const days: Array<{ day: string; events: Array<TimelineEvent & { time: string }> }> = []
  for (const e of events) {
    const day = siteDay(e.occurredAt, timeZone)
    const last = days.at(-1)
    // Each time carries its zone's letters: a long history crosses daylight-saving changes.
    const row = { ...e, time: siteTime(e.occurredAt, timeZone) }
    if (last?.day === day) last.events.push(row)
    else days.push({ day, events: [row] })
  }

  return (
    <div className="text-sm leading-5">
      <ol className="divide-y divide-line/70">
        {days.map((d) => (
          // On a desk the day sits in a gutter beside its events, so quiet days cost one line, not two.
          <li key={d.day} className="sm:grid sm:grid-cols-[9.5rem_1fr]">
            <h3 className="bg-sunken/60 px-4 py-1.5 text-xs leading-5 font-semibold text-ink-soft sm:bg-transparent sm:py-2">
              <time dateTime={d.day}>{formatDay(d.day)}</time>
            </h3>
            <ol className="divide-y divide-line/40">
              {d.events.map((e) => {
                const k = kindOf(e.kind)
                return (
                  <li
                    key={e.id}
                    className="grid grid-cols-[4.75rem_1fr] gap-x-3 gap-y-0.5 px-4 py-2 sm:grid-cols-[4.75rem_8.5rem_1fr] sm:pl-0"
                  >
                    <time dateTime={e.occurredAt} className="font-mono text-xs leading-5 whitespace-nowrap text-ink-soft tabular-nums">
                      {e.time}
                    </time>
                    <span className="flex items-center gap-1.5 font-medium">
                      <span aria-hidden="true" className={`inline-block w-3.5 shrink-0 text-center text-[0.8rem] ${k.tint}`}>
                        {k.glyph}
                      </span>
                      {k.label}
                    </span>
                    <span className="col-start-2 min-w-0 break-words sm:col-start-3">
                      {e.detectorId != null && e.detectorTag && (
                        <>
                          <Link to={`/devices/${e.detectorId}`} className={`${TAP_AREA} font-mono text-accent hover:underline`}>
                            {e.detectorTag}
                          </Link>
                          <span className="text-ink-faint"> · </span>
                        </>
                      )}
                      {e.detail ?? <span className="text-ink-faint">No detail recorded</span>}
                      {e.by && <span className="whitespace-nowrap text-ink-faint"> · by {e.by}</span>}
                    </span>
                  </li>
                )
              })}
            </ol>
          </li>
        ))}
      </ol>
      <p className="border-t border-line/70 px-4 py-2 text-xs text-ink-faint">
        Times in {timeZone === 'UTC' ? 'UTC' : `site time (${timeZone.replace(/_/g, ' ')})`}.
      </p>
    </div>
  )
}
