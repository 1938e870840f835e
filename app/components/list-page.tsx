import type { ColumnDef, RowSelectionState } from '@tanstack/react-table'
import { useMemo, useState } from 'react'
import { useSearchParams } from 'react-router'
import { useSWRConfig } from 'swr'
import { BulkBar } from './bulk/bulk-bar'
import type { Technician } from './bulk/action-fields'
import type { BulkList } from './bulk/catalog'
import { listQuery } from '~/utils/list-window'
import type { SentWindow } from '~/utils/list-window'
import { DataTable, type PhoneCard } from './data-table'
import { ExportButton } from './export-button'
import { FilterBar, type FilterOption } from './filter-bar'
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
  /** How a row reads on a phone (see DataTable). */
  phone: (r: Row) => PhoneCard
  /** Acts on many rows at once: the selection bar and its palette entries (`today`: the office's day). */
  bulk?: { list: BulkList; technicians: Technician[]; today: string }
  /** The first window of rows, read by the page's loader (`firstWindow`). */
  first?: SentWindow
}) {
  const [params] = useSearchParams()
  const query = useMemo(() => listQuery(params), [params])
  const [selection, setSelection] = useState<RowSelectionState>({})
  const { mutate } = useSWRConfig()
  const bulkChanged = () => {
    setSelection({})
    void mutate((key) => typeof key === 'string' && key.startsWith(p.endpoint))
  }
  return (
    <div className="mx-auto max-w-[100rem]">
      <PageHeader title={p.title}>{p.note ?? <KeyHint />}</PageHeader>
      <FilterBar placeholder={p.placeholder} filters={p.filters}>
        <SavedViews page={p.page} query={query} />
        <ExportButton page={p.page} query={query} />
      </FilterBar>
      {p.bulk && (
        <BulkBar
          list={p.bulk.list}
          endpoint={p.endpoint}
          query={query}
          selected={Object.keys(selection).map(Number)}
          technicians={p.bulk.technicians}
          today={p.bulk.today}
          onChanged={bulkChanged}
        />
      )}
      <DataTable<Row>
        selection={selection}
        onSelectionChange={setSelection}
        endpoint={p.endpoint}
        query={query}
        columns={p.columns}
        rowHref={p.rowHref}
        label={p.label}
        storageKey={p.page}
        sortable={p.sortable}
        defaultSort={p.defaultSort}
        phone={p.phone}
        first={p.first}
      />
    </div>
  )
}

/** A list's keys, shown only where there is a keyboard to press them. */
export function KeyHint({ children = 'j/k to move · x to select · Enter to open · ? for every key' }: { children?: React.ReactNode }) {
  return <span className="touch:hidden">{children}</span>
}

/** Filter choices from the trade's words, in sentence case like the state badges: 'out-of-service' → 'Out of service'. */
export const options = (values: readonly string[]) => values.map((v) => ({ value: v, label: sentence(v) }))

export const sentence = (v: string) => {
  const words = v.replace(/-/g, ' ')
  return words.charAt(0).toUpperCase() + words.slice(1)
}
