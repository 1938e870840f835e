/** A labelled bar for the upload and the check; `share` from 0 to 1, or null while unknown. */
export function ProgressBar({ label, share, detail }: { label: string; share: number | null; detail?: string }) {
  const pct = share === null ? null : Math.round(Math.min(1, Math.max(0, share)) * 100)
  return (
    <div className="my-3" role="status">
      <div className="mb-1 flex justify-between gap-2 text-sm">
        <span>{label}</span>
        <span className="font-mono text-ink-soft">{detail ?? (pct === null ? '' : `${pct}%`)}</span>
      </div>
      <progress className="h-2 w-full overflow-hidden rounded-sm accent-[var(--color-accent)]" max={100} value={pct ?? undefined} aria-label={label} />
    </div>
  )
}
