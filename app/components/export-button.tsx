import { usePaletteActions } from './command-palette'
import { quietButtonClass } from './ui/page-header'

// Pages whose list goes by another name in the export route.
const LIST_OF_PAGE: Record<string, string> = { devices: 'detectors' }

/** The export route's address for a list page under its filters and sort. */
export const exportHref = (page: string, query: string) => `/api/export/${LIST_OF_PAGE[page] ?? page}${query ? `?${query}` : ''}`

/**
 * Downloads every row of the list under the filters and sort on screen (not just the rows loaded),
 * as CSV. A plain link: the browser streams the file straight to disk. The palette offers the same
 * as "Export this list (CSV)".
 */
export function ExportButton({ page, query }: { page: string; query: string }) {
  const href = exportHref(page, query)
  usePaletteActions([
    {
      id: 'export-csv',
      label: 'Export this list (CSV)',
      run: () => {
        // The same link as the button, clicked for the palette: a download, the page stays.
        const a = document.createElement('a')
        a.href = href
        a.download = ''
        document.body.append(a)
        a.click()
        a.remove()
      },
    },
  ])
  return (
    <a href={href} download className={`${quietButtonClass} inline-flex items-center whitespace-nowrap`}>
      Export CSV
    </a>
  )
}
