/** The standing caution wherever work on equipment is planned or recorded. */
export function Caution({ compact = false }: { compact?: boolean }) {
  return (
    <aside
      role="note"
      aria-label="Safety caution"
      className="flex gap-3 rounded-md border border-soon/40 bg-soon-soft px-4 py-3 text-sm text-ink"
    >
      <span aria-hidden="true" className="mt-0.5 font-mono font-semibold text-soon">
        !
      </span>
      <div>
        <p className="font-semibold">Before any work: notify, then work.</p>
        {!compact && (
          <p className="mt-1 text-ink-soft">
            Tell the monitoring company and site management and have the system placed in test before a unit is
            powered down or a detector is tripped. Fire alarm panels and alarm wiring belong to the fire alarm
            contractor: HVAC staff do not alter them. Local codes, the authority having jurisdiction (AHJ), the
            device&apos;s listing and instructions, and licensed practice take precedence over anything shown here.
          </p>
        )}
      </div>
    </aside>
  )
}
