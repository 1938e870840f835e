import { useState } from 'react'
import { useRevalidator } from 'react-router'
import { requireUser } from '~/.server/auth'
import { getDb } from '~/.server/db'
import { auditPage, auditQuery } from '~/.server/repos/delay-audit'
import { officeToday } from '~/.server/today'
import { AuditCounts } from '~/components/delay-audit/counts'
import { AuditSites } from '~/components/delay-audit/sites'
import { RunPanel } from '~/components/delay-audit/run-panel'
import { Field, inputClass, PageHeader } from '~/components/ui/page-header'
import type { RouteAccess } from '~/domain/permissions'
import { formatCount } from '~/utils/format'
import type { Route } from './+types/_app.delay-audit'

export const handle = { access: { loader: 'schedule:visits' } satisfies RouteAccess }

export const meta: Route.MetaFunction = () => [{ title: 'Delay-setting audit · Ductkeeper' }]

export async function loader({ request }: Route.LoaderArgs) {
  await requireUser(request, 'schedule:visits')
  const q = auditQuery.parse(Object.fromEntries(new URL(request.url).searchParams))
  const db = getDb()
  const technicians = db.$client.prepare("select id, name from users where role = 'technician' and active = 1 order by name").all() as Array<{ id: number; name: string }>
  return { ...auditPage(db, q.outcome, q.page), technicians, today: officeToday() }
}

const OUTCOME_WORDS = { agree: 'agree', disagree: 'disagree', unknown: 'were never recorded' } as const

export default function DelayAudit({ loaderData }: Route.ComponentProps) {
  const d = loaderData
  const revalidator = useRevalidator()
  const [chosen, setChosen] = useState<number[]>([])
  const [date, setDate] = useState('')
  const [technicianId, setTechnicianId] = useState('')
  const outcomeCount = d.counts[d.outcome]
  // Nothing ticked: the action works on every detector of the outcome across the fleet.
  const scope = chosen.length ? { ids: chosen } : { filter: `delay=${d.outcome}` }
  const scopeWords = chosen.length ? `${formatCount(chosen.length)} chosen` : `all ${formatCount(outcomeCount)} that ${OUTCOME_WORDS[d.outcome]}`
  const refresh = () => {
    setChosen([])
    void revalidator.revalidate()
  }

  return (
    <div className="mx-auto max-w-6xl space-y-6">
      <PageHeader title="Delay-setting audit">Each module&apos;s recorded reporting delay against its site&apos;s agreed policy</PageHeader>
      <p role="note" className="rounded-md border border-soon/40 bg-soon-soft px-4 py-3 text-sm">
        The technician checks the module&apos;s delay setting per the device&apos;s instructions and coordinates any change with the monitoring
        company, after notifying it and site management. HVAC staff never alter the fire alarm panel. Local codes, the AHJ and the device&apos;s
        listing take precedence.
      </p>
      {(d.counts.policiesBeyond > 0 || d.counts.settingsBeyond > 0) && (
        <p role="note" aria-label="Beyond the NFPA 72 limit" className="rounded-md border border-late/40 bg-late-soft px-4 py-3 text-sm">
          {[
            d.counts.policiesBeyond > 0 && `${formatCount(d.counts.policiesBeyond)} site${d.counts.policiesBeyond === 1 ? ' has' : 's have'} agreed`,
            d.counts.settingsBeyond > 0 && `${formatCount(d.counts.settingsBeyond)} detector${d.counts.settingsBeyond === 1 ? ' is' : 's are'} set to`,
          ]
            .filter(Boolean)
            .join(', and ')}{' '}
          a delay longer than the {d.limitSeconds} s NFPA 72 allows for reporting a trouble. Such a delay is never assumed compliant: verify with the AHJ.
        </p>
      )}

      <AuditCounts counts={d.counts} outcome={d.outcome} />

      <section aria-labelledby="act-h" className="rounded-md border border-line bg-panel p-4">
        <div className="flex flex-wrap items-baseline justify-between gap-2">
          <h2 id="act-h" className="font-semibold">
            Act on {scopeWords}
          </h2>
          <a className="text-sm text-accent underline" href={`/api/delay-audit?outcome=${d.outcome}&format=csv`} download>
            Export these as CSV
          </a>
        </div>
        {d.outcome === 'agree' && (
          <div className="mt-3">
            <p className="mb-2 text-sm text-ink-soft">Marks each agreeing setting as observed today ({d.today}), as read from the module.</p>
            <RunPanel
              action="delay-audit"
              body={{ ...scope, do: 'verify' }}
              label="marking verified"
              applyLabel={(n) => `Mark ${formatCount(n)} verified`}
              columns={[{ key: 'label', label: 'Detector' }, { key: 'delayObservedOn', label: 'Observed on' }]}
              onChanged={refresh}
              disabled={outcomeCount === 0}
            />
          </div>
        )}
        {d.outcome === 'disagree' && (
          <div className="mt-3 flex flex-col gap-3">
            <p className="text-sm text-ink-soft">
              One repair visit per site for its disagreeing detectors, each with a functional re-test. Left blank, the day is each site&apos;s next
              working day and the technician the site&apos;s usual one.
            </p>
            <div className="flex flex-wrap gap-3">
              <Field label="Day (optional)">
                <input type="date" className={inputClass} value={date} min={d.today} onChange={(e) => setDate(e.target.value)} />
              </Field>
              <Field label="Technician (optional)">
                <select className={inputClass} value={technicianId} onChange={(e) => setTechnicianId(e.target.value)}>
                  <option value="">Each site&apos;s usual technician</option>
                  {d.technicians.map((t) => (
                    <option key={t.id} value={t.id}>
                      {t.name}
                    </option>
                  ))}
                </select>
              </Field>
            </div>
            <RunPanel
              action="delay-audit"
              body={{ ...scope, do: 'correction-visits', ...(date ? { date } : {}), ...(technicianId ? { technicianId: Number(technicianId) } : {}) }}
              label="correction visits"
              applyLabel={(n) => `Create ${formatCount(n)} visit${n === 1 ? '' : 's'}`}
              columns={[
                { key: 'site', label: 'Site' },
                { key: 'scheduledOn', label: 'Day' },
                { key: 'technician', label: 'Technician' },
                { key: 'detectors', label: 'Detectors' },
              ]}
              onChanged={refresh}
              disabled={outcomeCount === 0}
            />
          </div>
        )}
        {d.outcome === 'unknown' && (
          <p className="mt-3 text-sm text-ink-soft">
            Nobody has recorded these settings: the technician reads the delay switches at the next visit and records them with the visit.
          </p>
        )}
      </section>

      <AuditSites page={d} chosen={chosen} onChoose={setChosen} />
    </div>
  )
}
