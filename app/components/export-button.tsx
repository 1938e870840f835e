import { quietButtonClass } from './ui/page-header'

// Pages whose list goes by another name in the export route.
const LIST_OF_PAGE: Record<string, string> = { devices: 'detectors' }

/**
 * Downloads every row of the list under the filters and sort on screen (not just the rows loaded),
 * as CSV. A plain link: the browser streams the file straight to disk.
 */
export function ExportButton({ page, query }: { page: string; query: string }) {
  const list = LIST_OF_PAGE[page] ?? page
  return (
    <a href={`/api/export/${list}${query ? `?${query}` : ''}`} download className={`${quietButtonClass} inline-flex items-center whitespace-nowrap`}>
      Export CSV
    </a>
  )
}
