import { useEffect, useRef, useState } from 'react'
import type { Labelling, Terminal } from '~/domain/contacts'
import { correctTerminals } from '~/domain/loop'

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
const SHOULD = 'var(--color-ok)'
// Where a wire belongs is drawn over a broad light band, so it never reads as the thin unit-side wiring.
const HALO = 'var(--color-ok-soft)'

/** One recorded connection that differs from a correct loop: where it is, where it belongs, in words. */
interface Correction {
  n: number
  what: string
  recorded: string
  should: string
}

/** The recorded wiring against a correct supervised loop for this module's labelling. */
function wiringCorrections(p: Pick<WiringDiagramProps, 'alarmTerminal' | 'supervisoryTerminal' | 'eolPlacement' | 'supervisoryLabelledIn'>): Correction[] {
  const correct = correctTerminals(p.supervisoryLabelledIn)
  const out: Correction[] = []
  if (p.alarmTerminal !== correct.alarmTerminal) {
    out.push({ n: out.length + 1, what: 'Alarm conductor', recorded: `on alarm ${p.alarmTerminal}`, should: `on alarm ${correct.alarmTerminal}` })
  }
  if (p.eolPlacement === 'across-pair') {
    out.push({
      n: out.length + 1,
      what: 'End-of-line resistor',
      recorded: 'straight across the loop',
      should: `in series through supervisory ${correct.supervisoryTerminal}, from supervisory C`,
    })
  } else if (p.supervisoryTerminal !== correct.supervisoryTerminal) {
    out.push({ n: out.length + 1, what: 'Resistor lead', recorded: `on supervisory ${p.supervisoryTerminal}`, should: `on supervisory ${correct.supervisoryTerminal}` })
  }
  return out
}

/** A correction's mark beside a wire: ✗ and its number on the recorded one, ✓ and its number where it belongs. */
function Mark({ x, y, n, kind }: { x: number; y: number; n: number; kind: 'recorded' | 'should' }) {
  return (
    <text x={x} y={y} className={`${LABEL} font-semibold`} fill={kind === 'recorded' ? FAULT : SHOULD}>
      {kind === 'recorded' ? '✗' : '✓'}
      {n}
    </text>
  )
}

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

function Resistor({ x1, x2, y, label, fault, should = false, below = false }: { x1: number; x2: number; y: number; label: string; fault: boolean; should?: boolean; below?: boolean }) {
  const mid = (x1 + x2) / 2
  const zig = Array.from({ length: 7 }, (_, i) => `${mid - 18 + i * 6},${y + (i % 2 === 0 ? -6 : 6)}`).join(' ')
  const stroke = fault ? FAULT : should ? SHOULD : INK
  return (
    <g>
      {should && <polyline points={`${x1},${y} ${mid - 24},${y} ${zig} ${mid + 24},${y} ${x2},${y}`} fill="none" stroke={HALO} strokeWidth={9} strokeLinejoin="round" />}
      <polyline points={`${x1},${y} ${mid - 24},${y} ${zig} ${mid + 24},${y} ${x2},${y}`} fill="none" stroke={stroke} strokeWidth={should ? 2.2 : 1.8} strokeDasharray={fault ? '5 3' : undefined} />
      <text x={mid} y={below ? y + 21 : y - 12} textAnchor="middle" className={`fill-ink font-mono ${LABEL}`}>
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
  const correct = correctTerminals(p.supervisoryLabelledIn)
  const corrections = wiringCorrections(p)
  const fix = (what: string) => corrections.find((c) => c.what === what)
  const alarmFix = fix('Alarm conductor')
  const supFix = fix('Resistor lead')
  const eolFix = fix('End-of-line resistor')
  const shouldAlarmY = ALARM_Y + ROW[correct.alarmTerminal]
  const shouldSupY = SUP_Y + ROW[correct.supervisoryTerminal]
  const line = (points: string, color: string, fault = false) => (
    <polyline points={points} fill="none" stroke={fault ? FAULT : color} strokeWidth={1.8} strokeDasharray={fault ? '5 3' : undefined} strokeLinejoin="round" />
  )
  const shouldLine = (points: string) => (
    <g>
      <polyline points={points} fill="none" stroke={HALO} strokeWidth={9} strokeLinejoin="round" />
      <polyline points={points} fill="none" stroke={SHOULD} strokeWidth={2.2} strokeLinejoin="round" />
    </g>
  )
  // The alarm conductor hops over the + run: the two are not joined.
  const alarmPath = (y: number) => `M${RIGHT + 5},${y} H${PLUS_X - 6} a6,6 0 0 1 12,0 H${MINUS_X}`
  const dot = (x: number, y: number) => <circle cx={x} cy={y} r={3} fill={INK} />
  const title = `Wiring plan: unit ${p.shutdownInput} input on auxiliary 1 ${auxTerminal}; alarm contact ${p.alarmTerminal} across the loop; ${
    through ? `end-of-line resistor through supervisory ${p.supervisoryTerminal}` : 'end-of-line resistor straight across the loop'
  }.`
  const faulty = [
    p.faults.alarm && 'alarm conductor',
    p.faults.supervisory && 'supervisory terminal',
    p.faults.eol && 'end-of-line resistor',
  ].filter(Boolean)
  const fullTitle = corrections.length
    ? `${title} Differs from a correct loop: ${corrections.map((c) => `${c.what} as recorded ${c.recorded}, as it should be ${c.should}`).join('; ')}.`
    : title

  return (
    // Beside the drawing where a desk has room for both; under it otherwise.
    <figure className="min-w-0 min-[1400px]:grid min-[1400px]:grid-cols-[minmax(0,auto)_minmax(11rem,1fr)] min-[1400px]:items-end min-[1400px]:gap-6">
      <ScrollBox label="Wiring drawing">
        <svg viewBox={`0 0 ${W} ${H}`} width={W} height={H} role="img" aria-label={fullTitle} className="block max-w-none">
          <title>{fullTitle}</title>
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
          <path
            d={alarmPath(alarmY)}
            fill="none"
            stroke={p.faults.alarm || alarmFix ? FAULT : INK}
            strokeWidth={1.8}
            strokeDasharray={p.faults.alarm || alarmFix ? '5 3' : undefined}
          />
          {line(`${MINUS_X},${alarmFix ? Math.min(alarmY, shouldAlarmY) : alarmY} ${MINUS_X},${PANEL_MINUS_Y} ${PANEL_X - 5},${PANEL_MINUS_Y}`, INK)}
          {alarmFix && (
            <>
              <path d={alarmPath(shouldAlarmY)} fill="none" stroke={HALO} strokeWidth={9} />
              <path d={alarmPath(shouldAlarmY)} fill="none" stroke={SHOULD} strokeWidth={2.2} />
              {dot(MINUS_X, Math.max(alarmY, shouldAlarmY))}
              <Mark x={RIGHT + 12} y={alarmY - 5} n={alarmFix.n} kind="recorded" />
              <Mark x={RIGHT + 12} y={shouldAlarmY - 5} n={alarmFix.n} kind="should" />
            </>
          )}
          {through ? (
            <>
              {line(`${PLUS_X},${SUP_Y} ${RIGHT + 5},${SUP_Y}`, INK)}
              {line(`${RIGHT + 5},${supY} ${RIGHT + 20},${supY}`, INK, p.faults.supervisory || Boolean(supFix))}
              <Resistor x1={RIGHT + 20} x2={MINUS_X} y={supY} label={kohm(p.eolOhms)} fault={p.faults.eol} below={Boolean(supFix) && shouldSupY < supY} />
              {dot(MINUS_X, supY)}
              {supFix && (
                <>
                  {shouldLine(`${RIGHT + 5},${shouldSupY} ${RIGHT + 20},${shouldSupY} ${RIGHT + 20},${supY}`)}
                  <Mark x={RIGHT + 6} y={supY + (shouldSupY < supY ? 18 : -5)} n={supFix.n} kind="recorded" />
                  <Mark x={RIGHT + 6} y={shouldSupY + (shouldSupY < supY ? -5 : 18)} n={supFix.n} kind="should" />
                </>
              )}
            </>
          ) : (
            <>
              <Resistor x1={PLUS_X} x2={MINUS_X} y={ACROSS_Y} label={kohm(p.eolOhms)} fault={p.faults.eol || Boolean(eolFix)} />
              {dot(PLUS_X, ACROSS_Y)}
              {dot(MINUS_X, ACROSS_Y)}
              {eolFix && (
                <>
                  <Mark x={PLUS_X + 8} y={ACROSS_Y + 19} n={eolFix.n} kind="recorded" />
                  {shouldLine(`${PLUS_X},${ACROSS_Y} ${PLUS_X},${SUP_Y} ${RIGHT + 5},${SUP_Y}`)}
                  {shouldLine(`${RIGHT + 5},${shouldSupY} ${RIGHT + 20},${shouldSupY}`)}
                  <Resistor x1={RIGHT + 20} x2={MINUS_X} y={shouldSupY} label={kohm(p.eolOhms)} fault={false} should below />
                  {dot(MINUS_X, shouldSupY)}
                  <Mark x={RIGHT + 8} y={shouldSupY - 5} n={eolFix.n} kind="should" />
                </>
              )}
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
            <Swatch color={FAULT} dashed /> ✗ As recorded, and wrong
          </span>
          {corrections.length > 0 && (
            <span className="inline-flex items-center gap-1.5">
              <Swatch color={SHOULD} halo /> ✓ As it should be
            </span>
          )}
        </span>
        {corrections.length > 0 && (
          <div className="text-sm text-ink">
            <span className="font-semibold">Where each wire should go</span>
            <ol className="mt-1 space-y-1">
              {corrections.map((c) => (
                <li key={c.n}>
                  <span className="font-semibold">{c.n}.</span> {c.what}: as recorded {c.recorded} <span className="text-late">(✗{c.n})</span>; as it
                  should be {c.should} <span className="text-ok">(✓{c.n})</span>.
                </li>
              ))}
            </ol>
            <span className="mt-1 block text-xs text-ink-soft">
              These are fire alarm loop connections: the fire alarm contractor moves them. HVAC staff do not open the panel or cut alarm
              wiring. If the readings show the loop is already right, correct the record instead.
            </span>
          </div>
        )}
        <span className="block">* Supervisory marks shown as labelled on the module ({p.supervisoryLabelledIn}).</span>
        {faulty.length > 0 && <span className="block font-medium text-late">Drawn as wrong: {faulty.join(', ')}.</span>}
      </figcaption>
    </figure>
  )
}

function Swatch({ color, dashed = false, halo = false }: { color: string; dashed?: boolean; halo?: boolean }) {
  return (
    <svg aria-hidden="true" width="22" height="10" className="shrink-0">
      {halo && <line x1="1" y1="5" x2="21" y2="5" stroke={HALO} strokeWidth={9} />}
      <line x1="1" y1="5" x2="21" y2="5" stroke={color} strokeWidth={2} strokeDasharray={dashed ? '5 3' : undefined} />
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
