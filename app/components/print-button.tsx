/** Opens the browser's print dialog; the print stylesheet leaves only the record on paper. */
export function PrintButton({ label = 'Print' }: { label?: string }) {
  return (
    <button
      type="button"
      onClick={() => window.print()}
      className="rounded-sm bg-accent px-3 py-1.5 text-sm font-medium text-accent-ink hover:opacity-90"
    >
      {label}
    </button>
  )
}
