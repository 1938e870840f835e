import { inputClass } from '~/components/ui/page-header'
import type { Uploaded } from './send'

/**
 * Each field the import knows, with the file's column chosen for it (guessed from the header names,
 * or as remembered for this source) and what that column holds on the first rows.
 */
export function MappingForm({ upload, mapping, onChange }: { upload: Uploaded; mapping: Uploaded['mapping']; onChange: (m: Uploaded['mapping']) => void }) {
  const sampleOf = (column: string | null) => {
    const i = column === null ? -1 : upload.headers.indexOf(column)
    return i === -1 ? '' : upload.sample.map((r) => r[i] ?? '').filter(Boolean).slice(0, 3).join(' · ')
  }
  return (
    <ul className="divide-y divide-line rounded-md border border-line bg-panel">
      {upload.fields.map((f) => {
        const column = mapping[f.key] ?? null
        const id = `map-${f.key}`
        return (
          <li key={f.key} className="grid gap-1 px-3 py-2 sm:grid-cols-[14rem_16rem_1fr] sm:items-center sm:gap-3">
            <label htmlFor={id} className="text-sm font-medium">
              {f.label}
              {f.always && <span className="ml-1 text-xs font-normal text-late">every row</span>}
              {f.hint && <span className="block text-xs font-normal text-ink-faint">{f.hint}</span>}
            </label>
            <select id={id} className={inputClass} value={column ?? ''} onChange={(e) => onChange({ ...mapping, [f.key]: e.target.value || null })}>
              <option value="">— not in this file —</option>
              {upload.headers.map((h) => (
                <option key={h} value={h}>
                  {h}
                </option>
              ))}
            </select>
            <span className="truncate font-mono text-xs text-ink-soft" title={sampleOf(column)}>
              {sampleOf(column)}
            </span>
          </li>
        )
      })}
    </ul>
  )
}
