import { useEffect, useRef, useState } from 'react'
import type { Labelling, Terminal } from '~/domain/contacts'

export interface WiringDiagramProps {
  shutdownInput: 'break-to-stop' | 'make-to-stop'
  auxContacts: number
  supervisoryLabelledIn: Labelling
  alarmTerminal: Terminal
  supervisoryTerminal: Terminal
  eolPlacement: 'through-supervisory' | 'across-pair'
  eolOhms: number
  /** Connections recorded but wrong: drawn dashed in the fault colour and called out in words. */
  faults: { alarm: boolean; supervisory: boolean; eol: boolean }
}

// Geometry, left to right: unit controls, the detector module, the two loop conductors, the panel.
// The drawing is laid out at its natural size (one user unit = one CSS pixel) and never scaled down:
// its labels stay as large as the page's text, and a narrow screen scrolls the drawing, not the page.
const W = 890
const H = 304
const UNIT = { x: 16, w: 200, y: 60, h: 150 }
const UNIT_X = UNIT.x + UNIT.w
const MOD = { x: 300, w: 200, y: 30, h: 260 }
const LEFT = MOD.x
const RIGHT = MOD.x + MOD.w
const PLUS_X = 560
const MINUS_X = 640
const PANEL = { x: 690, w: 184, y: 14, h: 276 }
const PANEL_X = PANEL.x
const ROW = { c: 0, NO: 26, NC: 52 } as const
const AUX_Y = [86, 180]
const ALARM_Y = 86
const SUP_Y = 180
const PANEL_PLUS_Y = 86
const PANEL_MINUS_Y = 252
const ACROSS_Y = 164

// Sizes in CSS pixels: the page's small text (13 px) is the floor for every label.
const LABEL = 'text-[13px]'
const TITLE = 'text-[15px]'

const INK = 'var(--color-ink)'
const HVAC = 'var(--color-accent)'
const FAULT = 'var(--color-late)'

function Terminals({ x, y, label, side }: { x: number; y: number; label: string; side: 'left' | 'right' }) {
  const text = side === 'left' ? x + 10 : x - 10
  const anchor = side === 'left' ? 'start' : 'end'
  return (
    <g>
      <text x={side === 'left' ? x + 10 : x - 10} y={y - 13} textAnchor={anchor} className={`fill-ink-soft ${LABEL} font-semibold`}>
        {label}
      </text>
      {(['c', 'NO', 'NC'] as const).map((t) => (
        <g key={t}>
          <circle cx={x} cy={y + ROW[t]} r={4.5} fill="var(--color-panel)" stroke={INK} strokeWidth={1.5} />
          <text x={text} y={y + ROW[t] + 4.5} textAnchor={anchor} className={`fill-ink font-mono ${LABEL}`}>
            {t === 'c' ? 'C' : t}
          </text>
        </g>
      ))}
    </g>
  )
}

function Resistor({ x1, x2, y, label, fault }: { x1: number; x2: number; y: number; label: string; fault: boolean }) {
  const mid = (x1 + x2) / 2
  const zig = Array.from({ length: 7 }, (_, i) => `${mid - 18 + i * 6},${y + (i % 2 === 0 ? -6 : 6)}`).join(' ')
  const stroke = fault ? FAULT : INK
  return (
    <g>
      <polyline points={`${x1},${y} ${mid - 24},${y} ${zig} ${mid + 24},${y} ${x2},${y}`} fill="none" stroke={stroke} strokeWidth={1.8} strokeDasharray={fault ? '5 3' : undefined} />
      <text x={mid} y={y - 12} textAnchor="middle" className={`fill-ink font-mono ${LABEL}`}>
        {label}
      </text>
    </g>
  )
}

const kohm = (ohms: number) => (ohms >= 1000 ? `${ohms / 1000} kΩ EOL` : `${ohms} Ω EOL`)

/** The connections this detector should have, as recorded, on one drawing: HVAC side left, fire alarm side right. */
export function WiringDiagram(p: WiringDiagramProps) {
  const auxTerminal: Terminal = p.shutdownInput === 'break-to-stop' ? 'NC' : 'NO'
  const alarmY = ALARM_Y + ROW[p.alarmTerminal]
  const supY = SUP_Y + ROW[p.supervisoryTerminal]
  const through = p.eolPlacement === 'through-supervisory'
  const line = (points: string, color: string, fault = false) => (
    <polyline points={points} fill="none" stroke={fault ? FAULT : color} strokeWidth={1.8} strokeDasharray={fault ? '5 3' : undefined} strokeLinejoin="round" />
  )
  const dot = (x: number, y: number) => <circle cx={x} cy={y} r={3} fill={INK} />
  const title = `Wiring plan: unit ${p.shutdownInput} input on auxiliary 1 ${auxTerminal}; alarm contact ${p.alarmTerminal} across the loop; ${
    through ? `end-of-line resistor through supervisory ${p.supervisoryTerminal}` : 'end-of-line resistor straight across the loop'
  }.`
  const faulty = [
    p.faults.alarm && 'alarm conductor',
    p.faults.supervisory && 'supervisory terminal',
    p.faults.eol && 'end-of-line resistor',
  ].filter(Boolean)

  return (
    // Beside the drawing where a desk has room for both; under it otherwise.
    <figure className="min-w-0 min-[1400px]:grid min-[1400px]:grid-cols-[minmax(0,auto)_minmax(11rem,1fr)] min-[1400px]:items-end min-[1400px]:gap-6">
      <ScrollBox label="Wiring drawing">
        <svg viewBox={`0 0 ${W} ${H}`} width={W} height={H} role="img" aria-label={title} className="block max-w-none">
          <title>{title}</title>
          {/* Unit controls */}
          <rect x={UNIT.x} y={UNIT.y} width={UNIT.w} height={UNIT.h} rx={6} fill="var(--color-sunken)" stroke="var(--color-line-strong)" />
          <text x={UNIT.x + 10} y={UNIT.y + 22} className={`fill-ink ${TITLE} font-semibold`}>
            Unit controls
          </text>
          <text x={UNIT.x + 10} y={UNIT.y + 40} className={`fill-ink-soft ${LABEL}`}>
            {p.shutdownInput === 'break-to-stop' ? 'break-to-stop input' : 'make-to-stop input'}
          </text>
          <circle cx={UNIT_X} cy={120} r={4.5} fill="var(--color-panel)" stroke={HVAC} strokeWidth={1.5} />
          <text x={UNIT_X - 10} y={124.5} textAnchor="end" className={`fill-ink font-mono ${LABEL}`}>
            R 24 VAC
          </text>
          <circle cx={UNIT_X} cy={180} r={4.5} fill="var(--color-panel)" stroke={HVAC} strokeWidth={1.5} />
          <text x={UNIT_X - 10} y={172} textAnchor="end" className={`fill-ink font-mono ${LABEL}`}>
            {p.shutdownInput === 'break-to-stop' ? 'STOP (24 V = run)' : 'SHUTDOWN (24 V = stop)'}
          </text>

          {/* Module */}
          <rect x={MOD.x} y={MOD.y} width={MOD.w} height={MOD.h} rx={8} fill="var(--color-panel)" stroke={INK} strokeWidth={1.5} />
          <text x={MOD.x + MOD.w / 2} y={MOD.y + 20} textAnchor="middle" className={`fill-ink ${TITLE} font-semibold`}>
            Detector module
          </text>
          <Terminals x={LEFT} y={AUX_Y[0]} label="Aux 1" side="left" />
          {p.auxContacts >= 2 && <Terminals x={LEFT} y={AUX_Y[1]} label="Aux 2" side="left" />}
          <Terminals x={RIGHT} y={ALARM_Y} label="Alarm" side="right" />
          <Terminals x={RIGHT} y={SUP_Y} label="Supervisory*" side="right" />

          {/* HVAC side: the installer's 24 VAC through auxiliary 1 */}
          {line(`${UNIT_X + 4},120 250,120 250,${AUX_Y[0]} ${LEFT - 5},${AUX_Y[0]}`, HVAC)}
          {line(`${UNIT_X + 4},180 272,180 272,${AUX_Y[0] + ROW[auxTerminal]} ${LEFT - 5},${AUX_Y[0] + ROW[auxTerminal]}`, HVAC)}

          {/* Fire alarm side: loop + to alarm C (and supervisory C), alarm contact to loop − */}
          {line(`${PANEL_X - 5},${PANEL_PLUS_Y} ${RIGHT + 5},${ALARM_Y}`, INK)}
          {line(`${PLUS_X},${ALARM_Y} ${PLUS_X},${through ? SUP_Y : ACROSS_Y}`, INK)}
          {dot(PLUS_X, PANEL_PLUS_Y)}
          {/* The alarm conductor hops over the + run: the two are not joined. */}
          <path
            d={`M${RIGHT + 5},${alarmY} H${PLUS_X - 6} a6,6 0 0 1 12,0 H${MINUS_X}`}
            fill="none"
            stroke={p.faults.alarm ? FAULT : INK}
            strokeWidth={1.8}
            strokeDasharray={p.faults.alarm ? '5 3' : undefined}
          />
          {line(`${MINUS_X},${alarmY} ${MINUS_X},${PANEL_MINUS_Y} ${PANEL_X - 5},${PANEL_MINUS_Y}`, INK)}
          {through ? (
            <>
              {line(`${PLUS_X},${SUP_Y} ${RIGHT + 5},${SUP_Y}`, INK)}
              {line(`${RIGHT + 5},${supY} ${RIGHT + 20},${supY}`, INK, p.faults.supervisory)}
              <Resistor x1={RIGHT + 20} x2={MINUS_X} y={supY} label={kohm(p.eolOhms)} fault={p.faults.eol} />
              {dot(MINUS_X, supY)}
            </>
          ) : (
            <>
              <Resistor x1={PLUS_X} x2={MINUS_X} y={ACROSS_Y} label={kohm(p.eolOhms)} fault={p.faults.eol} />
              {dot(PLUS_X, ACROSS_Y)}
              {dot(MINUS_X, ACROSS_Y)}
            </>
          )}

          {/* Panel */}
          <rect x={PANEL.x} y={PANEL.y} width={PANEL.w} height={PANEL.h} rx={6} fill="var(--color-sunken)" stroke="var(--color-line-strong)" />
          <text x={PANEL_X + 12} y={PANEL.y + 22} className={`fill-ink ${TITLE} font-semibold`}>
            Fire alarm panel
          </text>
          <text x={PANEL_X + 12} y={PANEL.y + 40} className={`fill-ink-soft ${LABEL}`}>
            initiating circuit
          </text>
          <circle cx={PANEL_X} cy={PANEL_PLUS_Y} r={4.5} fill="var(--color-panel)" stroke={INK} strokeWidth={1.5} />
          <text x={PANEL_X + 12} y={PANEL_PLUS_Y + 4.5} className={`fill-ink font-mono ${LABEL}`}>
            + loop
          </text>
          <circle cx={PANEL_X} cy={PANEL_MINUS_Y} r={4.5} fill="var(--color-panel)" stroke={INK} strokeWidth={1.5} />
          <text x={PANEL_X + 12} y={PANEL_MINUS_Y + 4.5} className={`fill-ink font-mono ${LABEL}`}>
            − loop
          </text>
          <text x={PANEL_X + 12} y={PANEL.y + PANEL.h - 14} className={`fill-ink-soft ${LABEL}`}>
            read only for HVAC staff
          </text>
        </svg>
      </ScrollBox>
      <figcaption className="mt-2 space-y-1 text-xs text-ink-soft min-[1400px]:mt-0 min-[1400px]:space-y-2">
        <span className="flex flex-wrap gap-x-4 gap-y-1 min-[1400px]:flex-col">
          <span className="inline-flex items-center gap-1.5">
            <Swatch color={HVAC} /> Unit shutdown, the installer&apos;s 24 VAC
          </span>
          <span className="inline-flex items-center gap-1.5">
            <Swatch color={INK} /> Fire alarm loop (the fire alarm contractor&apos;s)
          </span>
          <span className="inline-flex items-center gap-1.5">
            <Swatch color={FAULT} dashed /> Recorded connection that is wrong
          </span>
        </span>
        <span className="block">* Supervisory marks shown as labelled on the module ({p.supervisoryLabelledIn}).</span>
        {faulty.length > 0 && <span className="block font-medium text-late">Drawn as wrong: {faulty.join(', ')}.</span>}
      </figcaption>
    </figure>
  )
}

function Swatch({ color, dashed = false }: { color: string; dashed?: boolean }) {
  return (
    <svg aria-hidden="true" width="22" height="8" className="shrink-0">
      <line x1="1" y1="4" x2="21" y2="4" stroke={color} strokeWidth={2} strokeDasharray={dashed ? '5 3' : undefined} />
    </svg>
  )
}

/**
 * A box that scrolls sideways when its content is wider than the screen, so the page never does. It says
 * so in words while (and only while) there is more to see, and takes focus so the keys can scroll it.
 */
function ScrollBox({ label, children }: { label: string; children: React.ReactNode }) {
  const ref = useRef<HTMLDivElement>(null)
  // Until measured (and without script) the hint shows where the drawing cannot fit: narrower than a desk.
  const [overflows, setOverflows] = useState<boolean | null>(null)
  useEffect(() => {
    const box = ref.current
    if (!box) return
    const measure = () => setOverflows(box.scrollWidth > box.clientWidth + 1)
    measure()
    const watch = new ResizeObserver(measure)
    watch.observe(box)
    return () => watch.disconnect()
  }, [])
  return (
    <div>
      <p
        data-scroll-hint
        aria-hidden="true"
        className={`mb-1.5 text-xs font-medium text-ink-soft ${overflows === null ? 'xl:hidden' : overflows ? '' : 'hidden'}`}
      >
        Wider than the screen: swipe the drawing sideways to see all of it <span className="font-mono">→</span>
      </p>
      <div
        ref={ref}
        role="region"
        aria-label={`${label} (scrolls sideways)`}
        tabIndex={0}
        data-scroll-x
        className="overflow-x-auto overscroll-x-contain rounded-sm border border-line/70 bg-panel focus-visible:outline-2 focus-visible:outline-accent"
      >
        {children}
      </div>
    </div>
  )
}
