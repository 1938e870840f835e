export function PageHeader({ title, children }: { title: string; children?: React.ReactNode }) {
  return (
    <header className="mb-6 flex flex-wrap items-baseline justify-between gap-2">
      <h1 className="text-2xl font-semibold">{title}</h1>
      {children && <div className="text-sm text-ink-faint">{children}</div>}
    </header>
  )
}

export function Notice({ tone, children }: { tone: 'ok' | 'error'; children: React.ReactNode }) {
  return (
    <p
      role={tone === 'error' ? 'alert' : 'status'}
      className={`mb-4 rounded-sm px-3 py-2 text-sm ${tone === 'error' ? 'bg-late-soft text-late' : 'bg-ok-soft text-ok'}`}
    >
      <span aria-hidden="true" className="mr-1.5 font-mono">
        {tone === 'error' ? '!' : '✓'}
      </span>
      {children}
    </p>
  )
}

export const inputClass =
  'rounded-sm border border-line-strong bg-panel px-2.5 py-1.5 text-sm text-ink placeholder:text-ink-faint focus:border-accent'
export const buttonClass = 'rounded-sm bg-accent px-3 py-1.5 text-sm font-medium text-accent-ink hover:bg-accent/90 disabled:opacity-50'
export const quietButtonClass = 'rounded-sm border border-line-strong px-2.5 py-1 text-xs text-ink hover:bg-sunken'

export function Field({ label, error, children }: { label: string; error?: string; children: React.ReactNode }) {
  return (
    <label className="flex flex-col gap-1 text-xs font-medium text-ink-soft">
      {label}
      {children}
      {error && <span className="text-late">{error}</span>}
    </label>
  )
}
