import { Form, Link, useNavigate } from 'react-router'
import { z } from 'zod'
import { requireUser } from '~/.server/auth'
import { getDb } from '~/.server/db'
import { auditPage, auditPeople, namesFor } from '~/.server/repos/audit-log'
import { PageHeader, inputClass, quietButtonClass } from '~/components/ui/page-header'
import { TAP } from '~/components/ui/tap'
import { AUDIT_KINDS, AUDIT_KIND_KEYS, describe, type AuditItem, type Part } from '~/domain/audit-sentences'
import { dayStartUtc, readableInstant } from '~/domain/audit-values'
import { isIsoDate, addDays } from '~/domain/dates'
import { can, type RouteAccess } from '~/domain/permissions'
import type { Route } from './+types/_app.admin.audit'

export const handle = { access: { loader: 'view:audit' } satisfies RouteAccess }

export const meta: Route.MetaFunction = () => [{ title: 'Audit log · Ductkeeper' }]

// Raw entries per page; entries written together show as one line, so a page often reads shorter.
const PAGE = 60
const day = z.string().refine(isIsoDate).optional().catch(undefined)
const cursor = z.coerce.number().int().positive().optional().catch(undefined)
const query = z.object({
  kind: z.enum(AUDIT_KIND_KEYS).optional().catch(undefined),
  actor: z.coerce.number().int().positive().optional().catch(undefined),
  from: day,
  to: day,
  signins: z
    .literal('1')
    .optional()
    .catch(undefined)
    .transform((v) => v === '1'),
  before: cursor,
  after: cursor,
})
type Filters = Pick<z.infer<typeof query>, 'kind' | 'actor' | 'from' | 'to' | 'signins'>

const timeZone = () => process.env.OFFICE_TIME_ZONE ?? 'America/Chicago'

export async function loader({ request }: Route.LoaderArgs) {
  const me = await requireUser(request, 'view:audit')
  const q = query.parse(Object.fromEntries(new URL(request.url).searchParams))
  const db = getDb()
  const tz = timeZone()
  const page = auditPage(db, {
    kind: q.kind,
    actor: q.actor,
    from: q.from ? dayStartUtc(q.from, tz) : undefined,
    until: q.to ? dayStartUtc(addDays(q.to, 1), tz) : undefined,
    signIns: q.signins,
    before: q.before,
    after: q.after,
    limit: PAGE,
  })
  const names = namesFor(db, page.groups.flat())
  const o = { timeZone: tz, linkPeople: can(me.role, 'manage:users') }
  const items = page.groups.map((g) => ({ ...describe(g, names, o), when: readableInstant(g[0].at, tz) }))
  const filters: Filters = { kind: q.kind, actor: q.actor, from: q.from, to: q.to, signins: q.signins }
  return { items, filters, people: auditPeople(db), olderThan: page.olderThan, newerThan: page.newerThan, timeZone: tz }
}

/** The URL for a set of filters: empty ones are left out, and the page starts again at the newest. */
function hrefFor(f: Partial<Filters>, extra: Record<string, string> = {}) {
  const p = new URLSearchParams()
  if (f.kind) p.set('kind', f.kind)
  if (f.actor) p.set('actor', String(f.actor))
  if (f.from) p.set('from', f.from)
  if (f.to) p.set('to', f.to)
  if (f.signins) p.set('signins', '1')
  for (const [k, v] of Object.entries(extra)) p.set(k, v)
  const s = p.toString()
  return s ? `/admin/audit?${s}` : '/admin/audit'
}

// On a phone each chip is a 44 px finger target; on a desk the compact size.
const chip = (on: boolean) => `${TAP} rounded-sm px-2.5 py-1 whitespace-nowrap ${on ? 'bg-accent text-accent-ink' : 'border border-line-strong hover:bg-sunken'}`

export default function Audit({ loaderData: d }: Route.ComponentProps) {
  const navigate = useNavigate()
  const f = d.filters
  const filtered = Boolean(f.kind || f.actor || f.from || f.to || f.signins)
  // Person, dates and the sign-in toggle apply as soon as they change; the button is for no-script use.
  const apply = (form: HTMLFormElement) => {
    const data = new FormData(form)
    const value = (k: string) => String(data.get(k) ?? '') || undefined
    void navigate(hrefFor({ kind: f.kind, actor: Number(value('actor')) || undefined, from: value('from'), to: value('to'), signins: data.get('signins') === '1' }))
  }
  return (
    <div className="mx-auto max-w-5xl">
      <PageHeader title="Audit log">Who changed what, and when · times in {d.timeZone.replace(/_/g, ' ')}</PageHeader>

      <nav aria-label="Kind of change" className="mb-3 flex flex-wrap gap-2 text-sm">
        <Link to="/admin/audit" className={chip(!filtered)} aria-current={!filtered ? 'page' : undefined}>
          Everything
        </Link>
        {AUDIT_KINDS.map((k) => (
          <Link key={k.key} to={hrefFor({ ...f, kind: k.key })} className={chip(f.kind === k.key)} aria-current={f.kind === k.key ? 'page' : undefined}>
            {k.label}
          </Link>
        ))}
      </nav>

      <Form
        method="get"
        aria-label="Filters"
        className="mb-4 flex flex-wrap items-end gap-3 rounded-md border border-line bg-panel p-3 text-sm"
        onChange={(e) => apply(e.currentTarget)}
        onSubmit={(e) => {
          e.preventDefault()
          apply(e.currentTarget)
        }}
        key={hrefFor(f)}
      >
        {f.kind && <input type="hidden" name="kind" value={f.kind} />}
        <label className="flex min-w-0 flex-col gap-1 text-xs font-medium text-ink-soft">
          Person
          <select name="actor" defaultValue={f.actor ?? ''} className={`${inputClass} w-full sm:w-52`}>
            <option value="">Anyone</option>
            {d.people.map((p) => (
              <option key={p.id} value={p.id}>
                {p.name}
              </option>
            ))}
          </select>
        </label>
        <label className="flex flex-col gap-1 text-xs font-medium text-ink-soft">
          From
          <input type="date" name="from" defaultValue={f.from ?? ''} className={inputClass} />
        </label>
        <label className="flex flex-col gap-1 text-xs font-medium text-ink-soft">
          To
          <input type="date" name="to" defaultValue={f.to ?? ''} className={inputClass} />
        </label>
        <label className="flex min-h-11 items-center gap-2 py-1.5 text-sm sm:min-h-0">
          <input type="checkbox" name="signins" value="1" defaultChecked={f.signins} />
          Show sign-ins
        </label>
        <button type="submit" className={quietButtonClass}>
          Apply
        </button>
        {filtered && (
          <Link to="/admin/audit" className={`${TAP} py-1.5 text-sm underline`}>
            Clear filters
          </Link>
        )}
      </Form>

      {d.items.length === 0 ? (
        <p className="rounded-md border border-line bg-panel px-4 py-6 text-center text-ink-soft">
          {filtered ? (
            <>
              Nothing matches these filters.{' '}
              <Link to="/admin/audit" className="underline">
                Show everything
              </Link>
            </>
          ) : (
            'Nothing recorded yet.'
          )}
        </p>
      ) : (
        <ol aria-label="Entries" className="divide-y divide-line/70 rounded-md border border-line bg-panel">
          {d.items.map((item) => (
            <Entry key={item.id} item={item} when={item.when} />
          ))}
        </ol>
      )}

      <nav aria-label="Pages" className="mt-3 flex items-center justify-between gap-3 text-sm">
        <span className="text-ink-faint">{filtered ? 'Filtered' : 'All entries'} · newest first</span>
        <span className="flex gap-4">
          {d.newerThan !== null && (
            <Link className={`${TAP} underline`} to={hrefFor(f, { after: String(d.newerThan) })}>
              ← Newer
            </Link>
          )}
          {d.olderThan !== null && (
            <Link className={`${TAP} underline`} to={hrefFor(f, { before: String(d.olderThan) })}>
              Older →
            </Link>
          )}
        </span>
      </nav>
    </div>
  )
}

function Sentence({ parts }: { parts: Part[] }) {
  return (
    <>
      {parts.map((p, i) =>
        typeof p === 'string' ? (
          <span key={i}>{p}</span>
        ) : p.href ? (
          <Link key={i} to={p.href} className="font-medium text-accent underline decoration-accent/30 underline-offset-2 hover:decoration-accent">
            {p.text}
          </Link>
        ) : (
          <span key={i} className="font-medium">
            {p.text}
          </span>
        ),
      )}
    </>
  )
}

const KIND_LABEL = Object.fromEntries(AUDIT_KINDS.map((k) => [k.key, k.label])) as Record<string, string>

function Entry({ item, when }: { item: AuditItem; when: string }) {
  const detail = item.changes.length > 0 || item.records.length > 0
  return (
    <li className="flex flex-col gap-1 px-4 py-2.5 sm:flex-row sm:gap-4">
      <div className="flex shrink-0 items-baseline gap-2 text-xs text-ink-faint sm:w-40 sm:flex-col sm:gap-0.5">
        <time dateTime={item.at} className="font-mono">
          {when}
        </time>
        <span>{KIND_LABEL[item.kind] ?? 'Other'}</span>
      </div>
      <div className="min-w-0 flex-1 text-sm break-words">
        <p>
          <Sentence parts={item.parts} />
        </p>
        {detail && (
          <details className="mt-1 group">
            <summary className="cursor-pointer text-xs text-ink-soft select-none hover:text-ink">
              {item.changes.length > 0 ? `What changed (${item.changes.length} ${item.changes.length === 1 ? 'field' : 'fields'})` : ''}
              {item.changes.length > 0 && item.records.length > 0 ? ' · ' : ''}
              {item.records.length > 0 ? `${item.records.length} records` : ''}
            </summary>
            {item.changes.length > 0 && (
              <table className="mt-2 w-full table-fixed border-collapse text-xs">
                <thead className="text-left text-ink-faint">
                  <tr>
                    <th className="w-1/4 py-1 pr-2 font-medium">Field</th>
                    <th className="py-1 pr-2 font-medium">Before</th>
                    <th className="py-1 font-medium">After</th>
                  </tr>
                </thead>
                <tbody>
                  {item.changes.map((c) => (
                    <tr key={c.field} className="border-t border-line/60 align-top">
                      <th scope="row" className="py-1 pr-2 text-left font-medium text-ink-soft">
                        {c.field}
                      </th>
                      <td className="py-1 pr-2 break-words text-ink-soft">{c.before}</td>
                      <td className="py-1 break-words">{c.after}</td>
                    </tr>
                  ))}
                </tbody>
              </table>
            )}
            {item.records.length > 0 && (
              <ul className="mt-2 columns-1 gap-6 text-xs sm:columns-2">
                {item.records.map((r, i) => (
                  <li key={i} className="py-0.5">
                    <Sentence parts={r} />
                  </li>
                ))}
              </ul>
            )}
          </details>
        )}
      </div>
    </li>
  )
}
