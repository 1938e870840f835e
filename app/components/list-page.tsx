import type { ColumnDef } from '@tanstack/react-table'
import { useMemo } from 'react'
import { useSearchParams } from 'react-router'
import { DataTable } from './data-table'
import { FilterBar, listQuery, type FilterOption } from './filter-bar'
import { SavedViews } from './saved-views'
import { PageHeader } from './ui/page-header'

/** The shape every fleet list page shares: title, URL-held filters, saved views, the table. */
export function ListPage<Row extends { id: number }>(p: {
  title: string
  page: string
  endpoint: string
  label: string
  placeholder: string
  filters: FilterOption[]
  columns: ColumnDef<Row>[]
  rowHref: (r: Row) => string
  note?: React.ReactNode
  /** The list route's sort keys and default order (from its spec, through the page's loader). */
  sortable: readonly string[]
  defaultSort?: { key: string; dir: 'asc' | 'desc' }
}) {
  const [params] = useSearchParams()
  const query = useMemo(() => listQuery(params), [params])
  return (
    <div className="mx-auto max-w-[100rem]">
      <PageHeader title={p.title}>{p.note ?? 'j/k to move · x to select · Enter to open · ? for every key'}</PageHeader>
      <FilterBar placeholder={p.placeholder} filters={p.filters}>
        <SavedViews page={p.page} query={query} />
      </FilterBar>
      <DataTable<Row>
        endpoint={p.endpoint}
        query={query}
        columns={p.columns}
        rowHref={p.rowHref}
        label={p.label}
        storageKey={p.page}
        sortable={p.sortable}
        defaultSort={p.defaultSort}
      />
    </div>
  )
}

export const options = (values: readonly string[]) => values.map((v) => ({ value: v, label: v.replace(/-/g, ' ') }))
