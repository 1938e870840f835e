import { Link } from 'react-router'

export interface Crumb {
  to: string
  name: string
  /** Tags (unit, detector) read as codes. */
  mono?: boolean
}

/**
 * The records above this one, and optionally what this page is ("Edit", "Labels").
 * On a phone each crumb is a 44 px row of its own, stepped in under the one above: links that wrap
 * as a sentence would leave a finger-sized gap between short lines of text. On a desk they run on one
 * line, parted by dots.
 */
export function Breadcrumb({ items, here }: { items: Crumb[]; here?: string }) {
  const all = [...items.map((c) => ({ ...c, link: true as const })), ...(here ? [{ to: '', name: here, mono: false, link: false as const }] : [])]
  return (
    <nav aria-label="Breadcrumb" className="text-sm text-ink-faint">
      <ol className="flex flex-col sm:flex-row sm:flex-wrap sm:items-center sm:gap-x-1.5">
        {all.map((c, i) => (
          <li
            key={`${i}-${c.to}`}
            // What this page is repeats its heading; a phone leaves it out rather than give it a row.
            className={`${c.link ? 'flex' : 'hidden sm:flex'} min-h-11 items-center gap-x-1.5 sm:min-h-0`} style={{ ['--step' as string]: `${Math.min(i, 3) * 0.75}rem` }}>
            {i > 0 && (
              <span aria-hidden="true" className="pl-[var(--step)] sm:hidden">
                ↳
              </span>
            )}
            {c.link ? (
              <Link
                to={c.to}
                className={`inline-flex min-h-11 min-w-0 items-center break-words text-ink-soft underline decoration-line-strong underline-offset-2 hover:text-ink sm:min-h-0 ${c.mono ? 'font-mono' : ''}`}
              >
                {c.name}
              </Link>
            ) : (
              <span aria-current="page">{c.name}</span>
            )}
            {i < all.length - 1 && (
              <span aria-hidden="true" className="hidden sm:inline">
                ·
              </span>
            )}
          </li>
        ))}
      </ol>
    </nav>
  )
}
