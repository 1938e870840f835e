import type { TriageReason } from '~/domain/triage'

/**
 * Every reason a detector is in the queue, in the engine's own words with its points, and the
 * technician's note on a failed test: wrapped, never cut, so the whole case reads at a glance.
 */
export function Reasons({ reasons, followUp }: { reasons: TriageReason[]; followUp: string | null }) {
  return (
    <div data-slot="reasons" className="py-1.5 leading-snug whitespace-normal">
      {reasons.map((r, i) => (
        <span key={r.code}>
          {i > 0 && (
            <span aria-hidden="true" className="text-ink-faint">
              {' · '}
            </span>
          )}
          {r.text} <span className="font-mono text-xs text-ink-faint">+{r.points}</span>
        </span>
      ))}
      {followUp && <span className="block text-ink-soft">Technician: “{followUp}”</span>}
    </div>
  )
}
