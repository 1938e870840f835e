import { useState } from 'react'
import { Form, Link, useSubmit } from 'react-router'
import { z } from 'zod'
import { requireUser } from '~/.server/auth'
import { getDb } from '~/.server/db'
import { technicianOptions } from '~/.server/lists/visits'
import { technicianVisits } from '~/.server/repos/visit-field'
import { officeToday } from '~/.server/today'
import { Caution } from '~/components/caution'
import { StateBadge } from '~/components/state-badge'
import { taskWords } from '~/components/visit/detector-entry-form'
import { addDays } from '~/domain/dates'
import { can, type RouteAccess } from '~/domain/permissions'
import { Day } from '~/components/day'
import { formatDay } from '~/utils/format'
import type { Route } from './+types/_app.my-day'

export const handle = { access: { loader: 'record:work' } satisfies RouteAccess }
export const meta: Route.MetaFunction = () => [{ title: 'My day · Ductkeeper' }]

const WEEK_DAYS = 7
const query = z.object({ technician: z.coerce.number().int().positive().optional().catch(undefined) })

// A technician sees their own visits; the office and the lead may look at anyone's.
export async function loader({ request }: Route.LoaderArgs) {
  const user = await requireUser(request, 'record:work')
  const db = getDb()
  const pickAny = can(user.role, 'schedule:visits')
  const technicians = pickAny ? technicianOptions(db) : []
  const asked = query.parse(Object.fromEntries(new URL(request.url).searchParams)).technician
  const today = officeToday()
  const until = addDays(today, WEEK_DAYS - 1)
  // Opened bare by the office, the page shows the first technician with work this week.
  const firstWithWork = () => technicians.find((t) => t.active && technicianVisits(db, t.id, today, until).length > 0)?.id
  const technicianId = !pickAny ? user.id : (asked ?? (user.role === 'technician' ? user.id : (firstWithWork() ?? technicians.find((t) => t.active)?.id ?? user.id)))
  const visits = technicianVisits(db, technicianId, today, until)
  return {
    today,
    technicianId,
    technicianName: technicians.find((t) => t.id === technicianId)?.name ?? user.name,
    own: technicianId === user.id,
    technicians,
    todays: visits.filter((v) => v.scheduledOn === today),
    later: visits.filter((v) => v.scheduledOn !== today),
  }
}

type Visit = Route.ComponentProps['loaderData']['todays'][number]

export default function MyDay({ loaderData }: Route.ComponentProps) {
  const { today, todays, later, technicians, technicianId, technicianName, own } = loaderData
  const submit = useSubmit()
  return (
    <div className="mx-auto max-w-3xl space-y-5 text-base">
      <header className="flex flex-wrap items-end justify-between gap-3">
        <div>
          <h1 className="text-2xl font-semibold">{own ? 'My day' : `${technicianName}’s day`}</h1>
          <p className="text-ink-soft">
            <Day iso={today} />
          </p>
        </div>
        {technicians.length > 0 && (
          <Form method="get" className="min-w-0">
            <label className="flex flex-col gap-1 text-sm font-medium text-ink-soft">
              Technician
              <select
                name="technician"
                defaultValue={technicianId}
                className="min-h-11 rounded-md border border-line-strong bg-panel px-3 text-base text-ink"
                onChange={(e) => submit(e.currentTarget.form)}
              >
                {technicians.map((t) => (
                  <option key={t.id} value={t.id}>
                    {t.active ? t.name : `${t.name} (left)`}
                  </option>
                ))}
              </select>
            </label>
            <noscript>
              <button className="mt-2 min-h-11 rounded-md border border-line-strong px-3">Show</button>
            </noscript>
          </Form>
        )}
      </header>

      <Caution compact />

      <section aria-labelledby="today-h" className="space-y-3">
        <h2 id="today-h" className="text-lg font-semibold">
          Today
        </h2>
        {todays.length === 0 ? <p className="rounded-md border border-line bg-panel px-4 py-3 text-ink-soft">No visits today.</p> : todays.map((v) => <VisitCard key={v.id} v={v} />)}
      </section>

      <section aria-labelledby="week-h" className="space-y-3">
        <h2 id="week-h" className="text-lg font-semibold">
          Rest of the week
        </h2>
        {later.length === 0 ? <p className="rounded-md border border-line bg-panel px-4 py-3 text-ink-soft">Nothing else this week.</p> : later.map((v) => <VisitCard key={v.id} v={v} showDay />)}
      </section>
    </div>
  )
}

function VisitCard({ v, showDay = false }: { v: Visit; showDay?: boolean }) {
  const address = `${v.site.street}, ${v.site.city} ${v.site.postalCode}`
  const mc = v.monitoring
  return (
    <article aria-label={`${v.site.name}, ${formatDay(v.scheduledOn)}`} className="rounded-md border border-line bg-panel">
      <Link to={`/visits/${v.id}`} className="block rounded-t-md px-4 pt-3 pb-2 hover:bg-sunken">
        <div className="flex flex-wrap items-center justify-between gap-2">
          <span className="text-lg font-semibold text-accent underline decoration-accent/40 underline-offset-2">{v.site.name}</span>
          <StateBadge value={v.status} />
        </div>
        <div className="text-ink-soft">
          {showDay && (
            <>
              <Day iso={v.scheduledOn} /> ·{' '}
            </>
          )}
          {v.windowFrom ? (
            <span className="font-mono">
              {v.windowFrom}–{v.windowUntil ?? '…'}
            </span>
          ) : (
            'Any time'
          )}{' '}
          · <span className="capitalize">{v.kind}</span> · {v.detectors} {v.detectors === 1 ? 'detector' : 'detectors'}
        </div>
        <div className="text-sm text-ink-soft">{v.tasks.map((t) => `${taskWords(t.task)} ${t.n}`).join(' · ')}</div>
      </Link>
      <div className="space-y-2 border-t border-line/70 px-4 py-3">
        <CopyLine label="Address" text={address} />
        <p className="text-sm">
          <span className="text-ink-faint">Access: </span>
          {v.site.accessNotes ?? 'No notes'}
        </p>
        {mc?.name ? (
          <p className="text-sm">
            <span className="text-ink-faint">Notify first: </span>
            {mc.name}, {mc.notifyMethod === 'email' ? 'by e-mail' : mc.notifyMethod === 'portal' ? 'through their portal' : 'by phone'}, {mc.notifyLeadMinutes} min ahead
            {v.site.monitoringAccount && (
              <>
                {' '}
                (account <span className="font-mono">{v.site.monitoringAccount}</span>)
              </>
            )}
            <span className="mt-1 flex flex-wrap gap-2">
              {mc.notifyMethod === 'email' && mc.email && <ContactLink href={`mailto:${mc.email}`}>{mc.email}</ContactLink>}
              <ContactLink href={`tel:${mc.phone}`}>{mc.phone}</ContactLink>
              {mc.notifyMethod !== 'email' && mc.email && <ContactLink href={`mailto:${mc.email}`}>{mc.email}</ContactLink>}
            </span>
          </p>
        ) : (
          <p className="text-sm font-medium text-late">No monitoring company on record: find out who monitors the site before any work.</p>
        )}
      </div>
    </article>
  )
}

function ContactLink({ href, children }: { href: string; children: React.ReactNode }) {
  return (
    <a href={href} className="inline-flex min-h-11 max-w-full items-center rounded-md border border-line-strong px-3 font-mono text-base break-all text-accent hover:bg-sunken">
      {children}
    </a>
  )
}

function CopyLine({ label, text }: { label: string; text: string }) {
  const [copied, setCopied] = useState(false)
  return (
    <div className="flex items-center gap-2">
      <p className="min-w-0 flex-1 text-base">
        <span className="sr-only">{label}: </span>
        <span className="select-all">{text}</span>
      </p>
      <button
        type="button"
        className="min-h-11 shrink-0 rounded-md border border-line-strong px-3 text-sm font-medium hover:bg-sunken"
        onClick={() => {
          void navigator.clipboard?.writeText(text).then(
            () => setCopied(true),
            () => setCopied(false),
          )
        }}
      >
        {copied ? 'Copied' : 'Copy address'}
      </button>
    </div>
  )
}
