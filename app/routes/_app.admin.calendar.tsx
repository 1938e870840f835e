import { data, Form, useNavigation } from 'react-router'
import { z } from 'zod'
import { requireUser } from '~/.server/auth'
import { calendarChange, calendarPage, changeCalendar } from '~/.server/bulk/calendar'
import { getDb } from '~/.server/db'
import { formObject, readFormData } from '~/.server/http'
import { officeToday } from '~/.server/today'
import { buttonClass, Field, inputClass, Notice, PageHeader, quietButtonClass } from '~/components/ui/page-header'
import type { RouteAccess } from '~/domain/permissions'
import type { Route } from './+types/_app.admin.calendar'

export const handle = { access: { loader: 'manage:settings', action: 'manage:settings' } satisfies RouteAccess }

export const meta: Route.MetaFunction = () => [{ title: 'Company calendar · Ductkeeper' }]

const pageQuery = z.object({
  region: z.string().max(10).optional().catch(undefined),
  year: z.coerce.number().int().min(1990).max(2100).optional().catch(undefined),
})

export async function loader({ request }: Route.LoaderArgs) {
  await requireUser(request, 'manage:settings')
  const q = pageQuery.parse(Object.fromEntries(new URL(request.url).searchParams))
  const today = officeToday()
  return calendarPage(getDb(), q.region, q.year ?? Number(today.slice(0, 4)), today)
}

export async function action({ request }: Route.ActionArgs) {
  const me = await requireUser(request, 'manage:settings')
  const parsed = calendarChange.safeParse(formObject(await readFormData(request)))
  if (!parsed.success) return data({ ok: false, message: parsed.error.issues[0]?.message ?? 'Check the fields' }, { status: 400 })
  return { ok: true, message: changeCalendar(getDb(), me.id, parsed.data) }
}

export default function CompanyCalendar({ loaderData, actionData }: Route.ComponentProps) {
  const busy = useNavigation().state !== 'idle'
  const { regions, region, year, holidays, closed } = loaderData
  return (
    <div className="mx-auto max-w-5xl">
      <PageHeader title="Company calendar">Working days for every booking and bulk change</PageHeader>
      {actionData?.message && <Notice tone={actionData.ok ? 'ok' : 'error'}>{actionData.message}</Notice>}
      <p role="note" className="rounded-md border border-soon/40 bg-soon-soft px-4 py-3 text-sm">
        A public holiday is a day off only where it is marked observed; every other one is worked. Closed days are off for every site.
        Check site access and the monitoring company&apos;s hours before booking work on a public holiday.
      </p>

      <section aria-labelledby="holidays-h" className="my-6 rounded-md border border-line bg-panel p-4">
        <div className="flex flex-wrap items-end justify-between gap-3">
          <h2 id="holidays-h" className="font-semibold">
            Public holidays in {region}, {year}
          </h2>
          <Form method="get" className="flex items-end gap-2">
            <Field label="Region">
              <select name="region" defaultValue={region} className={inputClass}>
                {regions.map((r) => (
                  <option key={r} value={r}>
                    {r.includes('-') ? r : `${r} (every region)`}
                  </option>
                ))}
              </select>
            </Field>
            <Field label="Year">
              <input name="year" type="number" defaultValue={year} className={`${inputClass} w-24`} />
            </Field>
            <button className={quietButtonClass}>Show</button>
          </Form>
        </div>
        <table className="mt-3 w-full text-left text-sm">
          <thead className="text-xs text-ink-soft">
            <tr>
              <th className="py-1 pr-3 font-medium">Holiday</th>
              <th className="hidden py-1 pr-3 font-medium sm:table-cell">Date</th>
              <th className="hidden py-1 pr-3 font-medium sm:table-cell">The company</th>
              <th className="py-1 font-medium" />
            </tr>
          </thead>
          <tbody>
            {holidays.map((h) => (
              <tr key={h.name} className="border-t border-line/60">
                <td className="py-1.5 pr-3">
                  {h.name}
                  {/* A phone has no room for three columns: the day and what the company does sit under the name. */}
                  <span className="block text-xs text-ink-soft sm:hidden">
                    <Dates dates={h.dates} /> · {companyDoes(h, region)}
                  </span>
                </td>
                <td className="hidden py-1.5 pr-3 font-mono text-xs sm:table-cell">
                  <Dates dates={h.dates} />
                </td>
                <td className="hidden py-1.5 pr-3 sm:table-cell">{companyDoes(h, region)}</td>
                <td className="py-1.5 text-right">
                  {(!h.observed || h.observedFor === region) && (
                    <Form method="post">
                      <input type="hidden" name="intent" value="observe" />
                      <input type="hidden" name="region" value={region} />
                      <input type="hidden" name="name" value={h.name} />
                      <input type="hidden" name="on" value={h.observed ? '0' : '1'} />
                      <button disabled={busy} className={`${quietButtonClass} whitespace-nowrap`}>
                        {h.observed ? 'Work this day' : 'Take this day off'}
                      </button>
                    </Form>
                  )}
                </td>
              </tr>
            ))}
          </tbody>
        </table>
      </section>

      <section aria-labelledby="closed-h" className="rounded-md border border-line bg-panel p-4">
        <h2 id="closed-h" className="font-semibold">
          Company closed days
        </h2>
        <Form method="post" className="mt-3 flex flex-wrap items-end gap-3">
          <input type="hidden" name="intent" value="close" />
          <Field label="Day">
            <input name="day" type="date" required className={inputClass} />
          </Field>
          <Field label="Why">
            <input name="label" required className={`${inputClass} w-64`} placeholder="e.g. Stocktake" />
          </Field>
          <button disabled={busy} className={buttonClass}>
            Close that day
          </button>
        </Form>
        {closed.length === 0 ? (
          <p className="mt-3 text-sm text-ink-soft">No closed days ahead.</p>
        ) : (
          <ul className="mt-3 text-sm">
            {closed.map((c) => (
              <li key={c.day} className="flex items-center justify-between gap-3 border-t border-line/60 py-1.5">
                <span>
                  <span className="font-mono text-xs">{c.day}</span> · {c.label}
                </span>
                <Form method="post">
                  <input type="hidden" name="intent" value="reopen" />
                  <input type="hidden" name="day" value={c.day} />
                  <button disabled={busy} className={quietButtonClass}>
                    Open again
                  </button>
                </Form>
              </li>
            ))}
          </ul>
        )}
      </section>
    </div>
  )
}

// A date is never broken across lines; a holiday with a substitute day lists both.
function Dates({ dates }: { dates: string[] }) {
  return dates.map((d, i) => (
    <span key={d} className="font-mono whitespace-nowrap">
      {i > 0 && ', '}
      {d}
    </span>
  ))
}

const companyDoes = (h: { observed: boolean; observedFor: string | null }, region: string) =>
  h.observed ? `Closed${h.observedFor !== region ? ` (for all of ${h.observedFor})` : ''}` : 'Works'
