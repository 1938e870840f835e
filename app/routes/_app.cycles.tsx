import { useState } from 'react'
import { requireUser } from '~/.server/auth'
import { loadCompanyCalendar } from '~/.server/bulk/calendar'
import { getDb } from '~/.server/db'
import { officeToday } from '~/.server/today'
import { Caution } from '~/components/caution'
import { PlanGrid, type PlanExtra } from '~/components/cycles/plan-grid'
import { RunPanel, type RunPreview } from '~/components/delay-audit/run-panel'
import { Field, inputClass, PageHeader } from '~/components/ui/page-header'
import { addDays } from '~/domain/dates'
import type { RouteAccess } from '~/domain/permissions'
import { ENVIRONMENTS } from '~/domain/vocabulary'
import { formatCount } from '~/utils/format'
import type { Route } from './+types/_app.cycles'

export const handle = { access: { loader: 'schedule:visits' } satisfies RouteAccess }

export const meta: Route.MetaFunction = () => [{ title: 'Cleaning cycles · Ductkeeper' }]

export async function loader({ request }: Route.LoaderArgs) {
  await requireUser(request, 'schedule:visits')
  const db = getDb()
  const today = officeToday()
  const technicians = db.$client
    .prepare("select id, name, regions, daily_capacity as dailyCapacity, capacity_unit as capacityUnit from users where role = 'technician' and active = 1 order by name")
    .all() as Array<{ id: number; name: string; regions: string | null; dailyCapacity: number | null; capacityUnit: string }>
  // The company's next working day (a US-wide view; each site's own holidays are applied by the planner).
  const from = loadCompanyCalendar(db).forRegion('US').nextWorkingDay(addDays(today, 1))
  return { today, from, to: addDays(from, 27), technicians }
}

const ENV_WORDS: Record<string, string> = { clean: 'Clean air', dusty: 'Dusty', kitchen: 'Kitchen', humid: 'Humid' }

export default function Cycles({ loaderData }: Route.ComponentProps) {
  const d = loaderData
  const [environments, setEnvironments] = useState<string[]>(['humid', 'kitchen'])
  const [dueWithin, setDueWithin] = useState(60)
  const [from, setFrom] = useState(d.from)
  const [to, setTo] = useState(d.to)
  const [techIds, setTechIds] = useState<number[]>(d.technicians.map((t) => t.id))
  const [remove, setRemove] = useState<string[]>([])
  const [moves, setMoves] = useState<Array<{ key: string; technicianId: number; date: string }>>([])
  const [preview, setPreview] = useState<RunPreview | null>(null)
  const plan = preview?.extra as PlanExtra | undefined

  const flip = <T,>(list: T[], v: T) => (list.includes(v) ? list.filter((x) => x !== v) : [...list, v])
  // New choices start a new plan: hand changes belong to the plan they were made on.
  const choose = (f: () => void) => {
    f()
    setRemove([])
    setMoves([])
  }
  const filter = environments.map((e) => `environment=${e}`).join('&')
  const body = {
    filter,
    from,
    to,
    dueBy: addDays(d.today, Math.max(0, dueWithin)),
    technicianIds: techIds,
    ...(remove.length ? { remove } : {}),
    ...(moves.length ? { moves } : {}),
  }

  return (
    <div className="mx-auto max-w-7xl space-y-6">
      <PageHeader title="Cleaning cycles">Plan a round of cleaning visits over many sites at once</PageHeader>
      <Caution compact />

      <section aria-labelledby="choose-h" className="rounded-md border border-line bg-panel p-4">
        <h2 id="choose-h" className="mb-3 font-semibold">
          What to clean, when, and by whom
        </h2>
        <div className="grid gap-4 md:grid-cols-[1fr_1fr_2fr]">
          <fieldset className="flex flex-col gap-1 text-sm">
            <legend className="mb-1 text-xs font-medium text-ink-soft">Locations</legend>
            {ENVIRONMENTS.map((e) => (
              <label key={e} className="flex min-h-11 items-center gap-2 sm:min-h-8">
                <input type="checkbox" className="size-4" checked={environments.includes(e)} onChange={() => choose(() => setEnvironments(flip(environments, e)))} />
                {ENV_WORDS[e] ?? e}
              </label>
            ))}
          </fieldset>
          <div className="flex flex-col gap-3">
            <Field label="Cleaning due within (days)">
              <input type="number" min={0} max={365} className={inputClass} value={dueWithin} onChange={(e) => choose(() => setDueWithin(Number(e.target.value)))} />
            </Field>
            <Field label="First day">
              <input type="date" className={inputClass} min={d.today} value={from} onChange={(e) => choose(() => setFrom(e.target.value))} />
            </Field>
            <Field label="Last day">
              <input type="date" className={inputClass} min={from} value={to} onChange={(e) => choose(() => setTo(e.target.value))} />
            </Field>
          </div>
          <fieldset className="flex flex-col gap-1 text-sm">
            <legend className="mb-1 text-xs font-medium text-ink-soft">Technicians</legend>
            {d.technicians.map((t) => (
              <label key={t.id} className="flex min-h-11 flex-wrap items-center gap-x-2 sm:min-h-8">
                <input type="checkbox" className="size-4" checked={techIds.includes(t.id)} onChange={() => choose(() => setTechIds(flip(techIds, t.id)))} />
                <span>{t.name}</span>
                <span className="text-xs text-ink-faint">
                  {t.regions ? t.regions.split(',').join(', ') : 'every region'} · {t.dailyCapacity === null ? 'no daily limit' : `${t.dailyCapacity} ${t.capacityUnit} a day`}
                </span>
              </label>
            ))}
          </fieldset>
        </div>
      </section>

      <section aria-labelledby="plan-h" className="space-y-3">
        <h2 id="plan-h" className="font-semibold">
          The plan
        </h2>
        <p className="text-sm text-ink-soft">
          One visit per site per day, most overdue first, each technician kept to their regions and daily capacity after the work they already have,
          and no weekend, observed holiday or company closed day. Take visits out or move them, then create them all in one step.
        </p>
        <RunPanel
          action="cleaning-cycle"
          body={body}
          label="the plan"
          applyLabel={(n) => `Create ${formatCount(n)} cleaning visit${n === 1 ? '' : 's'}`}
          columns={[]}
          hideChanges
          autoPreview
          onPreview={setPreview}
          disabled={environments.length === 0 || techIds.length === 0}
        />
        {plan && (
          <>
            <p className="text-sm text-ink-soft">
              {formatCount(plan.visits.length)} visit{plan.visits.length === 1 ? '' : 's'} on {formatCount(plan.days.length)} day{plan.days.length === 1 ? '' : 's'} · {formatCount(preview?.refusedCount ?? 0)} detectors not placed ·{' '}
              {formatCount(plan.notDue)} of the chosen locations not due by {plan.dueBy}
            </p>
            <PlanGrid
              plan={plan}
              from={from}
              to={to}
              onRemove={(key) => setRemove([...remove, key])}
              onMove={(key, technicianId, date) => setMoves([...moves, { key, technicianId, date }])}
            />
          </>
        )}
      </section>
    </div>
  )
}
