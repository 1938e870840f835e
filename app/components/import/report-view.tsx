import type { Problem, Report } from './send'

const COUNT_LABELS: Record<string, string> = {
  rows: 'Rows in the file',
  customersAdded: 'Customers added',
  customersUpdated: 'Customers changed',
  sitesAdded: 'Sites added',
  sitesUpdated: 'Sites changed',
  unitsAdded: 'Units added',
  unitsUpdated: 'Units changed',
  detectorsAdded: 'Detectors added',
  detectorsUpdated: 'Detectors changed',
  unchangedRows: 'Rows already as stored',
  eventsAdded: 'Events added',
  alreadyPresent: 'Events already stored',
  duplicateRows: 'Repeated rows',
  skippedRows: 'Rows with problems (left out)',
}

function ProblemTable({ caption, rows, total }: { caption: string; rows: Problem[]; total: number }) {
  return (
    <div className="mt-4 overflow-x-auto rounded-md border border-line bg-panel">
      <table className="w-full text-left text-sm">
        <caption className="px-3 py-2 text-left font-semibold">
          {caption} {total > rows.length && <span className="font-normal text-ink-soft">(the first {rows.length.toLocaleString()} of {total.toLocaleString()})</span>}
        </caption>
        <thead className="bg-sunken text-xs whitespace-nowrap text-ink-soft">
          <tr>
            <th className="px-3 py-1.5 font-medium">Row</th>
            <th className="px-3 py-1.5 font-medium">Column</th>
            <th className="px-3 py-1.5 font-medium">Value</th>
            <th className="px-3 py-1.5 font-medium">Problem</th>
          </tr>
        </thead>
        <tbody className="divide-y divide-line">
          {rows.map((p, i) => (
            <tr key={`${p.row}-${p.column}-${i}`}>
              <td className="px-3 py-1.5 font-mono">{p.row}</td>
              <td className="px-3 py-1.5 [overflow-wrap:anywhere]">{p.column ?? '—'}</td>
              <td className="max-w-[8rem] truncate px-3 py-1.5 font-mono sm:max-w-[14rem]" title={p.value}>
                {p.value === '' ? <span className="text-ink-faint">blank</span> : p.value}
              </td>
              <td className="px-3 py-1.5 [overflow-wrap:anywhere]">{p.problem}</td>
            </tr>
          ))}
        </tbody>
      </table>
    </div>
  )
}

/** What the file would do (or did): the counts, then each problem by row and column. */
export function ReportView({ report }: { report: Report }) {
  const counts = Object.entries(report.counts).filter(([k, v]) => k === 'rows' || v > 0)
  return (
    <div>
      <dl className="grid grid-cols-2 gap-2 sm:grid-cols-4">
        {counts.map(([k, v]) => (
          <div key={k} className={`rounded-md border px-3 py-2 ${k === 'skippedRows' ? 'border-late/40 bg-late-soft' : 'border-line bg-panel'}`}>
            <dt className="text-xs text-ink-soft">{COUNT_LABELS[k] ?? k}</dt>
            <dd className="font-mono text-lg">{v.toLocaleString()}</dd>
          </div>
        ))}
      </dl>
      {report.problemCount > 0 && <ProblemTable caption="Problems" rows={report.problems} total={report.problemCount} />}
      {report.noteCount > 0 && <ProblemTable caption="Notes" rows={report.notes} total={report.noteCount} />}
    </div>
  )
}
