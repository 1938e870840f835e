// Every state reads in words and a glyph as well as colour, so it survives colour blindness,
// greyscale print-outs and glare on a roof.
const TONES = {
  ok: { cls: 'bg-ok-soft text-ok', glyph: '✓' },
  soon: { cls: 'bg-soon-soft text-soon', glyph: '◷' },
  late: { cls: 'bg-late-soft text-late', glyph: '!' },
  trouble: { cls: 'bg-trouble-soft text-trouble', glyph: '▲' },
  alarm: { cls: 'bg-alarm-soft text-alarm', glyph: '◆' },
  idle: { cls: 'bg-idle-soft text-idle', glyph: '–' },
} as const

export type Tone = keyof typeof TONES

const LABELS: Record<string, { tone: Tone; label: string }> = {
  ok: { tone: 'ok', label: 'Up to date' },
  'due-soon': { tone: 'soon', label: 'Due soon' },
  // Past its nominal date, still inside the window the standard allows: the words tell it from "due soon".
  due: { tone: 'soon', label: 'Due now' },
  overdue: { tone: 'late', label: 'Overdue' },
  normal: { tone: 'ok', label: 'Normal' },
  trouble: { tone: 'trouble', label: 'Trouble' },
  supervisory: { tone: 'alarm', label: 'Supervisory' },
  alarm: { tone: 'alarm', label: 'Alarm' },
  'out-of-service': { tone: 'idle', label: 'Out of service' },
  pass: { tone: 'ok', label: 'Pass' },
  fail: { tone: 'late', label: 'Fail' },
  incomplete: { tone: 'soon', label: 'Incomplete' },
  agree: { tone: 'ok', label: 'Agrees' },
  disagree: { tone: 'late', label: 'Disagrees' },
  unknown: { tone: 'idle', label: 'Not recorded' },
  planned: { tone: 'idle', label: 'Planned' },
  notified: { tone: 'soon', label: 'Notified' },
  'in-progress': { tone: 'soon', label: 'In progress' },
  done: { tone: 'ok', label: 'Done' },
  cancelled: { tone: 'idle', label: 'Cancelled' },
}

// A word this list does not know still reads in sentence case, like every other badge and filter.
const lookUp = (value: string) => LABELS[value] ?? { tone: 'idle' as Tone, label: value.charAt(0).toUpperCase() + value.slice(1).replace(/-/g, ' ') }

/** A value's badge; `prefix` names what it judges ("Loop") ahead of the house word for the value. */
export function StateBadge({ value, label, prefix }: { value: string; label?: string; prefix?: string }) {
  const known = lookUp(value)
  const tone = TONES[known.tone]
  return (
    <span
      className={`inline-flex items-center gap-1 rounded-sm px-1.5 py-0.5 text-xs font-medium whitespace-nowrap ${tone.cls}`}
    >
      <span aria-hidden="true" className="font-mono text-[0.7rem] leading-none">
        {tone.glyph}
      </span>
      {label ?? (prefix ? `${prefix}: ${known.label}` : known.label)}
    </span>
  )
}
