import { flexRender, getCoreRowModel, useReactTable, type ColumnDef, type RowSelectionState, type SortingState, type VisibilityState } from '@tanstack/react-table'
import { elementScroll, observeElementOffset, useVirtualizer } from '@tanstack/react-virtual'
import { useCallback, useEffect, useMemo, useRef, useState, useSyncExternalStore } from 'react'
import { Link, useLocation, useNavigate, useSearchParams } from 'react-router'
import { useSWRConfig } from 'swr'
import { FetchError, messageOf } from '~/utils/fetch-json'
import { formatCount } from '~/utils/format'
import { readWindow, WINDOW_ROWS, windowUrl, type ReadWindow, type SentWindow } from '~/utils/list-window'
import { useShortcut } from './keyboard'
import { LoadError } from './load-error'
import { useJson } from './use-json'

export interface Page<Row> {
  rows: Row[]
  total: number
  offset: number
  limit: number
  /** Counting stopped at `total`: there are more matching rows than that. */
  totalCapped?: boolean
}

/** A window of rows as the table keeps it: the route's answer, or its refusal of the address. */
type FirstWindow<Row> = ReadWindow<Page<Row>>

/** How one row reads on a phone: a title, its states in words, and up to two short lines. */
export interface PhoneCard {
  title: React.ReactNode
  badges?: React.ReactNode
  lines: React.ReactNode[]
}

export interface DataTableProps<Row extends { id: number }> {
  /** JSON list route, e.g. '/api/devices'. */
  endpoint: string
  /** Query string of the current filters (without offset/limit), from the URL. */
  query: string
  columns: ColumnDef<Row>[]
  rowHref?: (row: Row) => string
  label: string
  /** Where per-person column choices are remembered. */
  storageKey: string
  selection?: RowSelectionState
  onSelectionChange?: (next: RowSelectionState) => void
  /** Rows kept by id as they load, so the page can act on a selection it no longer shows. */
  onRowsSeen?: (rows: Row[]) => void
  /** Refresh every loaded window this often while the tab is visible (a background request). */
  refreshMs?: number
  /** Column ids the list route can sort by (its spec's `sorts`); only these headers are clickable. */
  sortable?: readonly string[]
  /** The route's order when the URL names none, so the header shows it. */
  defaultSort?: { key: string; dir: 'asc' | 'desc' }
  /** The fields a person needs on a phone; with it, rows stack as cards there instead of columns. */
  phone?: (row: Row) => PhoneCard
  /** Rows grow to show cells (and card lines) that wrap, measured as they render, instead of one line each. */
  wrapRows?: boolean
  /**
   * The first window from the page's loader: shown in the server's HTML and at once on a move within
   * the console, and taken as the cache's answer for its URL, so it is not asked for again. Used only
   * while its key is the current first window's URL.
   */
  first?: SentWindow
}

const PAGE = WINDOW_ROWS
const ROW_PX = 36
// A phone card: a title line and two lines of detail, each of which may wrap onto a second line (a
// site's name and town rarely fit 390 px on one). The height always leaves room for both to wrap, so
// every card is the same height and the virtualizer places rows without measuring them. A card whose
// lines fit on one each sits in the middle of its height.
const PHONE_LINE_PX = 20
const PHONE_ROW_PX = 16 + PHONE_LINE_PX + 2 * 2 * PHONE_LINE_PX
// A row that grows to fit (`wrapRows`) takes three to six lines at desk width: placed at that height
// before it is measured, the server's HTML holds the rows on a desk screen and few beyond.
const WRAP_ROW_PX = 96
const PHONE_QUERY = '(max-width: 47.99rem)'
// Browsers cap an element's height (about 33 million px in Chromium): 2 million rows at 36 px do not
// fit. Past this height the scroll box is shrunk and offsets are scaled between it and the virtualizer.
const MAX_SCROLL_PX = 8_000_000
// How long the visible range must rest before windows are fetched: a fast fling requests nothing.
const SETTLE_MS = 90

/** Narrower than the rail's breakpoint (md). The server renders the desk table; the phone swaps in on hydration. */
function useNarrow(): boolean {
  return useSyncExternalStore(
    (onChange) => {
      const m = window.matchMedia(PHONE_QUERY)
      m.addEventListener('change', onChange)
      return () => m.removeEventListener('change', onChange)
    },
    () => window.matchMedia(PHONE_QUERY).matches,
    () => false,
  )
}

/** A list route's refusal, as the error the table shows for a refused request. */
const refusal = (body: { error: string }) => new FetchError(400, messageOf(400, body), body)

/**
 * Loads one window of rows with SWR and reports it upward; renders nothing. Given the loader's answer
 * for its URL (`first`), it starts from that and does not ask on mounting.
 */
function WindowLoader<Row>(p: { url: string; onPage: (url: string, page: Page<Row> | undefined, error?: FetchError) => void; refreshMs?: number; retryToken: number; first?: FirstWindow<Row> }) {
  const { url, onPage } = p
  const seed = p.first && 'page' in p.first ? p.first.page : undefined
  // No keepPreviousData here: each window must answer for its own URL. The table itself keeps the
  // previous filter's rows on screen until the new first window arrives.
  const { data, error, retry } = useJson<Page<Row>>(url, {
    revalidateOnFocus: true,
    dedupingInterval: 4_000,
    refreshMs: p.refreshMs,
    ...(p.first && { fallbackData: seed, revalidateOnMount: false }),
  })
  // The loader's rows are newer than any the cache kept for this URL from an earlier visit: they
  // become its answer (and reach anything else showing that URL).
  const { mutate } = useSWRConfig()
  useEffect(() => {
    if (seed) void mutate(url, seed, { revalidate: false })
  }, [url, seed, mutate])
  useEffect(() => onPage(url, data, error), [url, data, error, onPage])
  const asked = useRef(p.retryToken)
  useEffect(() => {
    if (asked.current === p.retryToken) return
    asked.current = p.retryToken
    void retry()
  }, [p.retryToken, retry])
  return null
}

/**
 * A column's id names its row field and its sort key. Each column reads that field (so one without a
 * cell still shows its value; TanStack leaves a column with no accessor blank and unsortable), and
 * sorts only when the list route can sort by that id.
 */
function withAccessors<Row>(columns: ColumnDef<Row>[], sortable: readonly string[]): ColumnDef<Row>[] {
  return columns.map((c) => {
    const id = c.id ?? ('accessorKey' in c ? String(c.accessorKey) : undefined)
    const hasAccessor = 'accessorFn' in c || 'accessorKey' in c
    return {
      ...c,
      ...(id && !hasAccessor ? { accessorFn: (r: Row) => (r as Record<string, unknown>)[id] } : {}),
      enableSorting: !!id && c.enableSorting !== false && sortable.includes(id),
    } as ColumnDef<Row>
  })
}

/**
 * A fleet table: columns and sorting from TanStack Table, rows placed by TanStack Virtual, windows of
 * 100 rows fetched with SWR as they scroll into view. Only the visible rows are in the DOM.
 */
export function DataTable<Row extends { id: number }>(p: DataTableProps<Row>) {
  const [params, setParams] = useSearchParams()
  const navigate = useNavigate()
  const { pathname } = useLocation()
  const scrollRef = useRef<HTMLDivElement>(null)
  const pages = useRef(new Map<string, Page<Row>>())
  const [version, setVersion] = useState(0)
  const [total, setTotal] = useState<{ n: number; capped: boolean } | null>(null)
  const [error, setError] = useState<FetchError | null>(null)
  const [retryToken, setRetryToken] = useState(0)
  const [cursor, setCursor] = useState(0)
  const [windows, setWindows] = useState<number[]>([0])
  const [visibility, setVisibility] = useState<VisibilityState>({})
  const [ownSelection, setOwnSelection] = useState<RowSelectionState>({})
  const selection = p.selection ?? ownSelection
  const setSelection = p.onSelectionChange ?? setOwnSelection
  const [lastQuery, setLastQuery] = useState(p.query)
  const [shownQuery, setShownQuery] = useState(p.query)

  const cards = useNarrow() && !!p.phone
  const rowPx = cards ? PHONE_ROW_PX : ROW_PX

  const sort = params.get('sort') ?? p.defaultSort?.key ?? null
  const dir = params.get('dir') === 'desc' || (!params.get('dir') && !params.get('sort') && p.defaultSort?.dir === 'desc') ? 'desc' : 'asc'
  const sorting: SortingState = sort ? [{ id: sort, desc: dir === 'desc' }] : []
  const urlFor = useCallback((w: number, query = p.query) => windowUrl(p.endpoint, query, w), [p.endpoint, p.query])

  // A new filter or sort starts at the top (set while rendering, so no window of the old view's
  // places is asked for under the new query); rows of the old one stay on screen until the new arrive.
  if (lastQuery !== p.query) {
    setLastQuery(p.query)
    setCursor(0)
    setWindows([0])
  }
  useEffect(() => {
    // In braces: a browser may answer scrollTo with a promise, which is no effect's cleanup.
    scrollRef.current?.scrollTo({ top: 0 })
  }, [p.query])

  // The loader's first window for this address, taken in while rendering: its rows are in the
  // server's HTML and show in the same render as a move within the console, with no request.
  const loaded = p.first?.key === urlFor(0) ? readWindow<Page<Row>>(p.first) : undefined
  const [taken, setTaken] = useState<FirstWindow<Row>>()
  // Kept until window 0 leaves the screen: coming back to it later asks the route again, as before.
  const [firstFresh, setFirstFresh] = useState(true)
  if (loaded && loaded !== taken) {
    setTaken(loaded)
    setFirstFresh(true)
    if ('page' in loaded) {
      pages.current.set(loaded.key, loaded.page)
      setTotal({ n: loaded.page.total, capped: loaded.page.totalCapped === true })
      setShownQuery(p.query)
      setError(null)
    } else {
      setError(refusal(loaded.refused))
    }
    setVersion((v) => v + 1)
  }

  useEffect(() => {
    try {
      setVisibility(JSON.parse(localStorage.getItem(`ductkeeper:cols:${p.storageKey}`) ?? '{}'))
    } catch {
      // A damaged entry just means default columns.
    }
  }, [p.storageKey])

  const { endpoint, query, onRowsSeen } = p
  const onPage = useCallback(
    (url: string, page: Page<Row> | undefined, err?: FetchError) => {
      if (err) setError(err)
      if (!page) return
      // Rows from before a failed refresh stay on screen, and so does the word that they are old.
      if (!err) setError(null)
      pages.current.set(url, page)
      if (url.startsWith(`${endpoint}?${query ? `${query}&` : ''}offset=`)) {
        setTotal({ n: page.total, capped: page.totalCapped === true })
        setShownQuery(query)
        onRowsSeen?.(page.rows)
      }
      setVersion((v) => v + 1)
    },
    [endpoint, query, onRowsSeen],
  )

  const count = total?.n ?? 0
  // The virtualizer lays out every row it is given, in time with their number (2.1 million events took
  // ~80 ms a render, on the server for every page load). The server's render and the first one in the
  // browser lay out the first window only, which holds every row a person first sees; the whole list
  // is laid out straight after, once the rows are on screen.
  const [laidOut, setLaidOut] = useState(false)
  useEffect(() => setLaidOut(true), [])
  const placed = laidOut ? count : Math.min(count, PAGE)
  const scale = Math.max(1, (placed * rowPx) / MAX_SCROLL_PX)
  // Offsets map so that the real bottom lands on the virtual bottom: (virtual − view) / (real − view).
  const view = scrollRef.current?.clientHeight ?? 600
  const ratioRef = useRef(1)
  ratioRef.current = scale === 1 ? 1 : (placed * rowPx - view) / ((placed * rowPx) / scale - view)
  // TanStack Virtual hands back fresh functions each render; this component is not compiler-memoized.
  // eslint-disable-next-line react-hooks/incompatible-library
  const virtualizer = useVirtualizer({
    count: placed,
    getScrollElement: () => scrollRef.current,
    estimateSize: () => (p.wrapRows && !cards ? WRAP_ROW_PX : rowPx),
    // The rows beyond the screen wait for the browser: every row the server writes costs the page's
    // answer time (about 3 KB of HTML a Triage row).
    overscan: laidOut ? 12 : 1,
    // Before the box is measured (the server's render, and hydration), rows are placed for a box of
    // about a desk screen's height, so the server's HTML holds the rows a person first sees.
    initialRect: { width: 0, height: 720 },
    observeElementOffset: (instance, cb) => observeElementOffset(instance, (offset, isScrolling) => cb(offset * ratioRef.current, isScrolling)),
    scrollToFn: (offset, options, instance) => elementScroll(offset / ratioRef.current, options, instance),
  })
  // Cards and table rows differ in height: place every row anew when the width crosses over.
  useEffect(() => virtualizer.measure(), [rowPx, virtualizer])
  // Rows are placed in the shrunk box: virtual position, less the part of the offset that was scaled away.
  const shift = (virtualizer.scrollOffset ?? 0) * (1 - 1 / ratioRef.current)
  const items = virtualizer.getVirtualItems()
  const first = items[0]?.index ?? 0
  const last = items[items.length - 1]?.index ?? 0

  // Where the range rested last, to tell which way the reader is scrolling.
  const restedAt = useRef(first)
  useEffect(() => {
    const t = setTimeout(() => {
      const from = Math.floor(first / PAGE)
      const to = Math.floor(last / PAGE)
      const down = first > restedAt.current
      const up = first < restedAt.current
      restedAt.current = first
      const next = Array.from({ length: to - from + 1 }, (_, i) => from + i)
      // Scrolling on at reading speed: past the middle of the last window shown, the next one that
      // way is fetched before it is reached (and the server reads it on from the rows just served).
      if (down && last % PAGE >= PAGE / 2 && (to + 1) * PAGE < count) next.push(to + 1)
      if (up && first % PAGE < PAGE / 2 && from > 0) next.unshift(from - 1)
      setWindows((prev) => (prev.join() === next.join() ? prev : next))
      if (!next.includes(0)) setFirstFresh(false)
    }, SETTLE_MS)
    return () => clearTimeout(t)
  }, [first, last, count])

  const rowAt = (i: number): Row | undefined => {
    const page = pages.current.get(urlFor(Math.floor(i / PAGE), shownQuery))
    return page?.rows[i - page.offset]
  }
  const stale = shownQuery !== p.query
  const visibleRows = useMemo(() => {
    const out: Row[] = []
    for (let i = first; i <= last && i < count; i++) {
      const r = rowAt(i)
      if (r) out.push(r)
    }
    return out
    // eslint-disable-next-line react-hooks/exhaustive-deps
  }, [first, last, count, version, shownQuery, stale])

  const sortableKey = (p.sortable ?? []).join()
  // eslint-disable-next-line react-hooks/exhaustive-deps
  const columns = useMemo(() => withAccessors(p.columns, p.sortable ?? []), [p.columns, sortableKey])
  const sortBy = (next: { id: string; desc: boolean } | undefined) => {
    const q = new URLSearchParams(params)
    if (next) {
      q.set('sort', next.id)
      q.set('dir', next.desc ? 'desc' : 'asc')
    } else {
      q.delete('sort')
      q.delete('dir')
    }
    setParams(q, { replace: true })
  }
  const table = useReactTable({
    data: visibleRows,
    columns,
    getRowId: (r) => String(r.id),
    getCoreRowModel: getCoreRowModel(),
    // The server sorts; a header click only changes `sort` and `dir` in the URL. One column at a
    // time, ascending first, and a second click turns it round rather than dropping the order.
    manualSorting: true,
    enableMultiSort: false,
    enableSortingRemoval: false,
    sortDescFirst: false,
    onSortingChange: (u) => sortBy((typeof u === 'function' ? u(sorting) : u)[0]),
    enableRowSelection: true,
    state: { rowSelection: selection, columnVisibility: visibility, sorting },
    onRowSelectionChange: (u) => setSelection(typeof u === 'function' ? u(selection) : u),
    onColumnVisibilityChange: (u) => {
      const next = typeof u === 'function' ? u(visibility) : u
      setVisibility(next)
      localStorage.setItem(`ductkeeper:cols:${p.storageKey}`, JSON.stringify(next))
    },
  })

  const moveTo = (i: number) => {
    const clamped = Math.max(0, Math.min(count - 1, i))
    setCursor(clamped)
    virtualizer.scrollToIndex(clamped, { align: 'auto' })
    return clamped
  }
  const toggle = (i: number, on?: boolean) => {
    const row = rowAt(i)
    if (!row) return
    const id = String(row.id)
    const next = { ...selection }
    if (on ?? !next[id]) next[id] = true
    else delete next[id]
    setSelection(next)
  }
  useShortcut('row-down', () => moveTo(cursor + 1), count > 0)
  useShortcut('row-up', () => moveTo(cursor - 1), count > 0)
  useShortcut('toggle-select', () => toggle(cursor), count > 0)
  // Both rows join the selection in one update: two updates from the same snapshot would drop one.
  const extend = (step: 1 | -1) => {
    const from = rowAt(cursor)
    const to = rowAt(moveTo(cursor + step))
    setSelection({ ...selection, ...(from && { [from.id]: true }), ...(to && { [to.id]: true }) })
  }
  useShortcut('extend-down', () => extend(1), count > 0)
  useShortcut('extend-up', () => extend(-1), count > 0)
  useShortcut('open', () => {
    const row = rowAt(cursor)
    if (row && p.rowHref) navigate(p.rowHref(row))
  }, count > 0)
  useShortcut('close', () => setSelection({}), Object.keys(selection).length > 0)

  const leaves = table.getVisibleLeafColumns()
  // A column's size under 10 is a share of the free width; otherwise a fixed width in pixels.
  const grid = leaves.map((c) => ((c.columnDef.size ?? 1) < 10 ? `minmax(${c.columnDef.minSize ?? 120}px, ${c.columnDef.size ?? 1}fr)` : `${c.columnDef.size}px`)).join(' ')
  const minWidth = leaves.reduce((w, c) => w + ((c.columnDef.size ?? 1) < 10 ? (c.columnDef.minSize ?? 120) : (c.columnDef.size as number)), 0)
  const selected = Object.keys(selection).length

  const retry = () => {
    setError(null)
    setRetryToken((n) => n + 1)
  }

  return (
    <div className="rounded-md border border-line bg-panel">
      {windows.map((w) => (
        <WindowLoader<Row> key={urlFor(w)} url={urlFor(w)} onPage={onPage} refreshMs={p.refreshMs} retryToken={retryToken} first={w === 0 && firstFresh ? loaded : undefined} />
      ))}
      <div className="flex flex-wrap items-center justify-between gap-2 border-b border-line px-3 py-2 text-xs text-ink-soft">
        {/* One line that never wraps: a selection count must not push the rows down. */}
        <span role="status" aria-live="polite" className="min-w-0 flex-1 basis-0 truncate">
          {total === null ? (error ? 'Not loaded' : 'Loading…') : `${total.capped ? 'More than ' : ''}${formatCount(total.n)} ${p.label}`}
          {selected > 0 && (
            <>
              {` · ${formatCount(selected)} selected`}
              <span className="touch:hidden"> (Esc clears)</span>
            </>
          )}
        </span>
        {cards ? (
          <PhoneSort
            options={leaves.filter((c) => c.getCanSort()).map((c) => ({ id: c.id, label: typeof c.columnDef.header === 'string' ? c.columnDef.header : c.id }))}
            sort={sort}
            desc={dir === 'desc'}
            onChange={sortBy}
          />
        ) : (
        <details className="relative">
          <summary className="cursor-pointer rounded-sm px-2 py-0.5 hover:bg-sunken">Columns</summary>
          <div className="absolute right-0 z-10 mt-1 w-48 rounded-md border border-line bg-panel p-2 shadow-lg">
            {table.getAllLeafColumns().filter((c) => c.getCanHide()).map((c) => (
              <label key={c.id} className="flex items-center gap-2 py-0.5 text-sm text-ink">
                <input type="checkbox" checked={c.getIsVisible()} onChange={c.getToggleVisibilityHandler()} />
                {typeof c.columnDef.header === 'string' ? c.columnDef.header : c.id}
              </label>
            ))}
          </div>
        </details>
        )}
      </div>
      {error && <LoadError error={error} onRetry={retry} what={p.label} className="m-2" resetTo={pathname} />}
      <div ref={scrollRef} className="relative h-[calc(100dvh-15rem)] min-h-80 overflow-auto" tabIndex={-1}>
        <div role="table" aria-label={p.label} aria-rowcount={count + 1} style={cards ? undefined : { minWidth }}>
          {/* On a phone the cards name their own fields, and the sort is chosen above. */}
          <div role="rowgroup" className={cards ? 'sr-only' : 'sticky top-0 z-[1] border-b border-line bg-sunken'}>
            {table.getHeaderGroups().map((hg) => (
              <div role="row" key={hg.id} className="grid" style={{ gridTemplateColumns: grid }}>
                {hg.headers.map((h) => {
                  const canSort = h.column.getCanSort()
                  const sorted = h.column.getIsSorted()
                  return (
                    <div
                      role="columnheader"
                      key={h.id}
                      aria-sort={canSort ? (sorted === 'desc' ? 'descending' : sorted === 'asc' ? 'ascending' : 'none') : undefined}
                      className="truncate px-3 py-2 text-left text-xs font-medium text-ink-soft uppercase"
                    >
                      {canSort ? (
                        <button
                          type="button"
                          onClick={h.column.getToggleSortingHandler()}
                          className={`group inline-flex max-w-full items-center gap-1 uppercase hover:text-ink ${sorted ? 'text-ink' : ''}`}
                        >
                          {/* A narrow column shortens its name, never the arrow. */}
                          <span className="truncate">{flexRender(h.column.columnDef.header, h.getContext())}</span>
                          <span aria-hidden="true" className={`shrink-0 ${sorted ? '' : 'text-ink-faint/60 group-hover:text-ink-faint'}`}>
                            {sorted === 'asc' ? '▲' : sorted === 'desc' ? '▼' : '↕'}
                          </span>
                          <span className="sr-only">{sorted === 'asc' ? ', sorted ascending' : sorted === 'desc' ? ', sorted descending' : ', not sorted'}</span>
                        </button>
                      ) : (
                        flexRender(h.column.columnDef.header, h.getContext())
                      )}
                    </div>
                  )
                })}
              </div>
            ))}
          </div>
          <div role="rowgroup" className={`relative ${stale ? 'opacity-60' : ''}`} style={{ height: virtualizer.getTotalSize() / scale }}>
            {items.map((v) => {
              const data = rowAt(v.index)
              const row = data ? table.getRowModel().rowsById[String(data.id)] : undefined
              const isCursor = v.index === cursor
              const place = { height: rowPx, transform: `translateY(${v.start - shift}px)` }
              if (cards && p.phone) {
                const pick = row?.getVisibleCells().find((c) => c.column.id === 'select')
                const card = data ? p.phone(data) : null
                return (
                  <div
                    role="row"
                    key={v.key}
                    data-index={v.index}
                    aria-rowindex={v.index + 2}
                    aria-selected={row?.getIsSelected() ?? false}
                    data-cursor={isCursor || undefined}
                    ref={p.wrapRows ? virtualizer.measureElement : undefined}
                    // No cursor ring here: on a touch screen it would read as a selection no one made.
                    className={`absolute inset-x-0 top-0 flex items-stretch border-b border-line/60 ${row?.getIsSelected() ? 'bg-accent-soft' : ''} ${isCursor ? 'touch:outline-none outline-2 -outline-offset-2 outline-accent' : ''}`}
                    style={p.wrapRows ? { ...place, height: undefined, minHeight: rowPx } : place}
                  >
                    {pick && (
                      // The whole strip beside the card ticks the box: a finger-sized target.
                      <label role="cell" className="flex w-11 shrink-0 cursor-pointer items-center justify-center">
                        {flexRender(pick.column.columnDef.cell, pick.getContext())}
                      </label>
                    )}
                    <div role="cell" className={`min-w-0 flex-1 ${pick ? '' : 'pl-3'}`}>
                      {card && data ? (
                        <Link to={p.rowHref?.(data) ?? '#'} onClick={() => setCursor(v.index)} className="flex h-full flex-col justify-center py-2 pr-3 text-sm">
                          <span className="flex items-center justify-between gap-2">
                            <span className="min-w-0 truncate font-medium">{card.title}</span>
                            {card.badges && <span className="flex shrink-0 items-center gap-1">{card.badges}</span>}
                          </span>
                          {card.lines.slice(0, 2).map((line, i) => (
                            // Broken between words, never cut mid-word; past two lines (rare) clamped.
                            <span key={i} className={`block text-ink-soft break-words ${p.wrapRows ? '' : 'line-clamp-2'}`}>
                              {line}
                            </span>
                          ))}
                        </Link>
                      ) : (
                        <span className="block py-2 text-sm text-ink-faint">Loading…</span>
                      )}
                    </div>
                  </div>
                )
              }
              return (
                <div
                  role="row"
                  key={v.key}
                  data-index={v.index}
                  aria-rowindex={v.index + 2}
                  aria-selected={row?.getIsSelected() ?? false}
                  data-cursor={isCursor || undefined}
                  onClick={() => setCursor(v.index)}
                  onDoubleClick={() => data && p.rowHref && navigate(p.rowHref(data))}
                  className={`absolute inset-x-0 top-0 grid items-center border-b border-line/60 text-sm ${
                    row?.getIsSelected() ? 'bg-accent-soft' : v.index % 2 ? 'bg-paper/40' : ''
                  } ${isCursor ? 'outline-2 -outline-offset-2 outline-accent' : ''}`}
                  ref={p.wrapRows ? virtualizer.measureElement : undefined}
                  style={{ gridTemplateColumns: grid, ...place, ...(p.wrapRows && { height: undefined, minHeight: rowPx }) }}
                >
                  {row
                    ? row.getVisibleCells().map((cell) => (
                        <div role="cell" key={cell.id} className="truncate px-3">
                          {flexRender(cell.column.columnDef.cell, cell.getContext())}
                        </div>
                      ))
                    : <div role="cell" className="px-3 text-ink-faint">Loading…</div>}
                </div>
              )
            })}
          </div>
          {total?.n === 0 && <p className="px-4 py-10 text-center text-sm text-ink-soft">Nothing matches these filters.</p>}
        </div>
      </div>
    </div>
  )
}

/** A phone's stand-in for the header clicks: the sortable columns in a list, and the direction. */
function PhoneSort(p: { options: Array<{ id: string; label: string }>; sort: string | null; desc: boolean; onChange: (next: { id: string; desc: boolean }) => void }) {
  if (p.options.length === 0) return null
  const current = p.options.some((o) => o.id === p.sort) ? p.sort! : p.options[0].id
  return (
    <span className="flex items-center gap-1.5">
      <label className="flex items-center gap-1.5">
        Sort
        <select value={current} onChange={(e) => p.onChange({ id: e.target.value, desc: false })} className="min-h-11 rounded-sm border border-line-strong bg-panel px-2 text-sm text-ink">
          {p.options.map((o) => (
            <option key={o.id} value={o.id}>
              {o.label}
            </option>
          ))}
        </select>
      </label>
      <button
        type="button"
        onClick={() => p.onChange({ id: current, desc: !p.desc })}
        className="min-h-11 min-w-11 rounded-sm border border-line-strong px-2 text-sm text-ink"
        aria-label={p.desc ? 'Descending; switch to ascending' : 'Ascending; switch to descending'}
      >
        <span aria-hidden="true">{p.desc ? '▼' : '▲'}</span>
      </button>
    </span>
  )
}
