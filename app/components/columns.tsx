import type { ColumnDef } from '@tanstack/react-table'
import { Link } from 'react-router'
import { formatCount } from '~/utils/format'
import { StateBadge } from './state-badge'

// Small cell makers shared by the list pages, so every table reads the same way.
export function selectColumn<Row>(): ColumnDef<Row> {
  return {
    id: 'select',
    header: () => <span className="sr-only">Selected</span>,
    size: 40,
    enableSorting: false,
    enableHiding: false,
    cell: ({ row }) => (
      <input
        type="checkbox"
        aria-label="Select row"
        checked={row.getIsSelected()}
        onChange={row.getToggleSelectedHandler()}
        onClick={(e) => e.stopPropagation()}
        tabIndex={-1}
      />
    ),
  }
}

export function linkCell<Row>(href: (r: Row) => string, text: (r: Row) => React.ReactNode, mono = false): ColumnDef<Row>['cell'] {
  return ({ row }) => (
    <Link to={href(row.original)} className={`hover:underline ${mono ? 'font-mono' : 'font-medium'}`} tabIndex={-1}>
      {text(row.original)}
    </Link>
  )
}

/**
 * A cell whose text may take a second line instead of being cut, for tables whose rows grow to fit
 * (DataTable's `wrapRows`): a long site name reads in full.
 */
export function wrapCell<Row>(cell: ColumnDef<Row>['cell']): ColumnDef<Row>['cell'] {
  return (ctx) => <span className="block py-1.5 leading-snug break-words whitespace-normal">{typeof cell === 'function' ? cell(ctx) : cell}</span>
}

export function badgeCell<Row>(value: (r: Row) => string | null): ColumnDef<Row>['cell'] {
  return ({ row }) => {
    const v = value(row.original)
    return v ? <StateBadge value={v} /> : <span className="text-ink-faint">—</span>
  }
}

export function monoCell<Row>(value: (r: Row) => React.ReactNode): ColumnDef<Row>['cell'] {
  return ({ row }) => <span className="font-mono text-xs">{value(row.original) ?? '—'}</span>
}

/** A count with its noun, for the phone cards: '1 unit', '2,410 detectors'. */
export const countOf = (n: number, noun: string) => `${formatCount(n)} ${noun}${n === 1 ? '' : 's'}`
