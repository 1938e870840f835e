import { data, Form } from 'react-router'
import { Breadcrumb } from '~/components/breadcrumb'
import { z } from 'zod'
import { requireUser } from '~/.server/auth'
import { getDb } from '~/.server/db'
import { siteInspectionRecord } from '~/.server/repos/inspection-record'
import { pageNotFound, pageRecordId } from '~/.server/repos/record-id'
import { officeToday } from '~/.server/today'
import { kindWords, PropertyBlock, problemsOf, RecordCaution, VisitRecordSheet } from '~/components/inspection-record'
import { PrintButton } from '~/components/print-button'
import { addDays, addMonths, dateProblem } from '~/domain/dates'
import type { RouteAccess } from '~/domain/permissions'
import { formatDay } from '~/utils/format'
import type { Route } from './+types/_app.sites.$siteId_.record'
import '~/print.css'

export const handle = { access: { loader: 'view:fleet' } satisfies RouteAccess }

export const meta: Route.MetaFunction = ({ data }) => [
  { title: data ? `Record ${data.from} to ${data.to} · ${data.site.name} · Ductkeeper` : 'Site record · Ductkeeper' },
]

const day = z.string().superRefine((v, ctx) => {
  const problem = dateProblem(v)
  if (problem) ctx.addIssue({ code: 'custom', message: problem })
})
const period = z
  .object({ from: day.optional(), to: day.optional() })
  .refine((p) => !p.from || !p.to || p.from <= p.to, { message: 'The period must start on or before its end', path: ['from'] })

/** The period asked for; the last 12 months up to the office's today when a bound is left out. */
function periodOf(url: URL, today: string) {
  const parsed = period.safeParse({ from: url.searchParams.get('from') || undefined, to: url.searchParams.get('to') || undefined })
  if (!parsed.success) {
    throw data(parsed.error.issues.map((i) => `${i.path.join('.')}: ${i.message}`).join('; '), { status: 400 })
  }
  const to = parsed.data.to ?? (parsed.data.from && parsed.data.from > today ? parsed.data.from : today)
  const from = parsed.data.from ?? addDays(addMonths(to, -12), 1)
  if (from > to) throw data('from: The period must start on or before its end', { status: 400 })
  return { from, to }
}

export async function loader({ request, params }: Route.LoaderArgs) {
  await requireUser(request, 'view:fleet')
  const siteId = pageRecordId(params, 'siteId', 'site')
  const { from, to } = periodOf(new URL(request.url), officeToday())
  const record = siteInspectionRecord(getDb(), siteId, from, to)
  if (!record) throw pageNotFound('site')
  return record
}

export default function SiteRecord({ loaderData }: Route.ComponentProps) {
  const { site, company, from, to, visits } = loaderData
  return (
    <div className="print-root mx-auto max-w-5xl">
      <div className="no-print mb-4 space-y-3">
        <Breadcrumb items={[{ to: `/sites/${site.id}`, name: site.name }]} here="Inspection record for a period" />
        <div className="flex flex-wrap items-end justify-between gap-3">
          <Form method="get" className="flex flex-wrap items-end gap-3 text-sm">
            <label className="grid gap-1">
              <span className="text-ink-soft">From</span>
              <input type="date" name="from" defaultValue={from} required className="rounded-sm border border-line-strong bg-panel px-2 py-1" />
            </label>
            <label className="grid gap-1">
              <span className="text-ink-soft">To</span>
              <input type="date" name="to" defaultValue={to} required className="rounded-sm border border-line-strong bg-panel px-2 py-1" />
            </label>
            <button type="submit" className="rounded-sm border border-line-strong bg-panel px-3 py-1.5 hover:bg-sunken">
              Show
            </button>
          </Form>
          <PrintButton />
        </div>
      </div>

      <section className="record-sheet record-cover" aria-label="Summary of the period">
        <header className="record-title">
          <div>
            <h1>Duct smoke detector records, {formatDay(from)} to {formatDay(to)}</h1>
            <p>{company}</p>
          </div>
        </header>
        <div className="record-columns">
          <PropertyBlock site={site} company={company} />
          <p className="text-sm">
            {visits.total === 0
              ? 'No visit was completed at this property in the period.'
              : `${visits.total} completed ${visits.total === 1 ? 'visit' : 'visits'} in the period${
                  visits.rows.length < visits.total ? `; the latest ${visits.rows.length} are printed here` : ', each on the pages that follow'
                }.`}
          </p>
        </div>
        {visits.rows.length > 0 && (
          <>
            <h2>Visits in the period</h2>
            <table className="record-table">
              <thead>
                <tr>
                  <th>Date</th>
                  <th>Work</th>
                  <th>Technician</th>
                  <th>Devices</th>
                  <th>With a problem</th>
                  <th>Notice confirmation</th>
                </tr>
              </thead>
              <tbody>
                {visits.rows.map((v) => (
                  <tr key={v.id}>
                    <td>{formatDay(v.scheduledOn)}</td>
                    <td>{kindWords(v.kind)}</td>
                    <td>{v.technician ?? '—'}</td>
                    <td>{v.detectors.length}</td>
                    <td>{v.detectors.filter((d) => problemsOf(d).length > 0).length}</td>
                    <td className="font-mono">{v.notices.map((n) => n.confirmation ?? 'none').join(', ') || 'no notice'}</td>
                  </tr>
                ))}
              </tbody>
            </table>
          </>
        )}
        <RecordCaution />
      </section>

      {visits.rows.map((v) => (
        <VisitRecordSheet key={v.id} site={site} company={company} visit={v} />
      ))}
    </div>
  )
}
