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
const MOD = { x: 290, w: 170, y: 40, h: 250 }
const LEFT = MOD.x
const RIGHT = MOD.x + MOD.w
const PLUS_X = 525
const MINUS_X = 600
const PANEL_X = 645
const ROW = { c: 0, NO: 24, NC: 48 } as const
const AUX_Y = [84, 174]
const ALARM_Y = 84
const SUP_Y = 174
const PANEL_PLUS_Y = 84
const PANEL_MINUS_Y = 250
const ACROSS_Y = 160

const INK = 'var(--color-ink)'
const HVAC = 'var(--color-accent)'
const FAULT = 'var(--color-late)'

function Terminals({ x, y, label, side }: { x: number; y: number; label: string; side: 'left' | 'right' }) {
  const text = side === 'left' ? x + 10 : x - 10
  const anchor = side === 'left' ? 'start' : 'end'
  return (
    <g>
      <text x={side === 'left' ? x + 10 : x - 10} y={y - 12} textAnchor={anchor} className="fill-ink-faint text-[10px] font-semibold uppercase">
        {label}
      </text>
      {(['c', 'NO', 'NC'] as const).map((t) => (
        <g key={t}>
          <circle cx={x} cy={y + ROW[t]} r={4.5} fill="var(--color-panel)" stroke={INK} strokeWidth={1.5} />
          <text x={text} y={y + ROW[t] + 4} textAnchor={anchor} className="fill-ink font-mono text-[11px]">
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
      <text x={mid} y={y - 11} textAnchor="middle" className="fill-ink font-mono text-[10px]">
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

  return (
    <svg viewBox="0 0 800 340" role="img" aria-label={title} className="h-auto w-full max-w-3xl">
      <title>{title}</title>
      {/* Unit controls */}
      <rect x={20} y={60} width={150} height={150} rx={6} fill="var(--color-sunken)" stroke="var(--color-line-strong)" />
      <text x={30} y={80} className="fill-ink text-[12px] font-semibold">
        Unit controls
      </text>
      <text x={30} y={95} className="fill-ink-faint text-[10px]">
        {p.shutdownInput === 'break-to-stop' ? 'break-to-stop input' : 'make-to-stop input'}
      </text>
      <circle cx={170} cy={120} r={4.5} fill="var(--color-panel)" stroke={HVAC} strokeWidth={1.5} />
      <text x={160} y={124} textAnchor="end" className="fill-ink font-mono text-[11px]">
        R 24 VAC
      </text>
      <circle cx={170} cy={170} r={4.5} fill="var(--color-panel)" stroke={HVAC} strokeWidth={1.5} />
      <text x={160} y={166} textAnchor="end" className="fill-ink font-mono text-[11px]">
        {p.shutdownInput === 'break-to-stop' ? 'STOP (24 V = run)' : 'SHUTDOWN (24 V = stop)'}
      </text>

      {/* Module */}
      <rect x={MOD.x} y={MOD.y} width={MOD.w} height={MOD.h} rx={8} fill="var(--color-panel)" stroke={INK} strokeWidth={1.5} />
      <text x={MOD.x + MOD.w / 2} y={MOD.y + 18} textAnchor="middle" className="fill-ink text-[12px] font-semibold">
        Detector module
      </text>
      <Terminals x={LEFT} y={AUX_Y[0]} label="Aux 1" side="left" />
      {p.auxContacts >= 2 && <Terminals x={LEFT} y={AUX_Y[1]} label="Aux 2" side="left" />}
      <Terminals x={RIGHT} y={ALARM_Y} label="Alarm" side="right" />
      <Terminals x={RIGHT} y={SUP_Y} label={`Supervisory*`} side="right" />
      <text x={MOD.x + MOD.w / 2} y={MOD.y + MOD.h - 12} textAnchor="middle" className="fill-ink-faint text-[9px]">
        * marks shown as labelled ({p.supervisoryLabelledIn})
      </text>

      {/* HVAC side: the installer's 24 VAC through auxiliary 1 */}
      {line(`174,120 230,120 230,${AUX_Y[0]} ${LEFT - 5},${AUX_Y[0]}`, HVAC)}
      {line(`174,170 250,170 250,${AUX_Y[0] + ROW[auxTerminal]} ${LEFT - 5},${AUX_Y[0] + ROW[auxTerminal]}`, HVAC)}

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
      <rect x={PANEL_X} y={40} width={135} height={240} rx={6} fill="var(--color-sunken)" stroke="var(--color-line-strong)" />
      <text x={PANEL_X + 10} y={58} className="fill-ink text-[12px] font-semibold">
        Fire alarm panel
      </text>
      <text x={PANEL_X + 10} y={70} className="fill-ink-faint text-[10px]">
        initiating circuit
      </text>
      <circle cx={PANEL_X} cy={PANEL_PLUS_Y} r={4.5} fill="var(--color-panel)" stroke={INK} strokeWidth={1.5} />
      <text x={PANEL_X + 10} y={PANEL_PLUS_Y + 4} className="fill-ink font-mono text-[11px]">
        + loop
      </text>
      <circle cx={PANEL_X} cy={PANEL_MINUS_Y} r={4.5} fill="var(--color-panel)" stroke={INK} strokeWidth={1.5} />
      <text x={PANEL_X + 10} y={PANEL_MINUS_Y + 4} className="fill-ink font-mono text-[11px]">
        − loop
      </text>
      <text x={PANEL_X + 10} y={PANEL_MINUS_Y + 22} className="fill-ink-faint text-[9px]">
        read only for HVAC staff
      </text>

      <text x={20} y={325} className="fill-ink-faint text-[10px]">
        Teal: unit shutdown, installer&apos;s 24 VAC. Dark: fire alarm loop (the fire alarm contractor&apos;s). Red dashed: recorded connection
        that is wrong.
      </text>
    </svg>
  )
}
