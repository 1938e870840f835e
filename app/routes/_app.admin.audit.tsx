import { Link } from 'react-router'
import { z } from 'zod'
import { requireUser } from '~/.server/auth'
import { getDb } from '~/.server/db'
import { listAudit } from '~/.server/repos/users'
import { PageHeader } from '~/components/ui/page-header'
import type { RouteAccess } from '~/domain/permissions'
import { formatCount } from '~/utils/format'
import type { Route } from './+types/_app.admin.audit'

export const handle = { access: { loader: 'view:audit' } satisfies RouteAccess }

export const meta: Route.MetaFunction = () => [{ title: 'Audit log · Ductkeeper' }]

const PAGE = 50
const query = z.object({
  entity: z.enum(['user', 'api_token', 'detector', 'visit', 'site', 'unit', 'customer']).optional().catch(undefined),
  page: z.coerce.number().int().min(1).catch(1),
})

export async function loader({ request }: Route.LoaderArgs) {
  await requireUser(request, 'view:audit')
  const params = query.parse(Object.fromEntries(new URL(request.url).searchParams))
  const { rows, total } = listAudit(getDb(), { entity: params.entity, offset: (params.page - 1) * PAGE, limit: PAGE })
  return { rows, total, ...params }
}

const ENTITIES = [
  ['', 'Everything'],
  ['user', 'Users'],
  ['api_token', 'API tokens'],
] as const

export default function Audit({ loaderData: d }: Route.ComponentProps) {
  const pages = Math.max(1, Math.ceil(d.total / PAGE))
  const href = (page: number, entity = d.entity) => `?${new URLSearchParams({ ...(entity ? { entity } : {}), page: String(page) })}`
  return (
    <div className="mx-auto max-w-6xl">
      <PageHeader title="Audit log">{formatCount(d.total)} entries · who changed what, when</PageHeader>
      <nav aria-label="Filter" className="mb-3 flex gap-2 text-sm">
        {ENTITIES.map(([key, label]) => (
          <Link
            key={key}
            to={href(1, key || undefined)}
            className={`rounded-sm px-2.5 py-1 ${(d.entity ?? '') === key ? 'bg-accent text-accent-ink' : 'border border-line-strong hover:bg-sunken'}`}
          >
            {label}
          </Link>
        ))}
      </nav>
      <div className="overflow-x-auto rounded-md border border-line bg-panel">
        <table className="w-full text-sm">
          <thead className="text-left text-xs text-ink-faint uppercase">
            <tr>
              <th className="px-4 py-2 font-medium">When (UTC)</th>
              <th className="px-2 py-2 font-medium">Who</th>
              <th className="px-2 py-2 font-medium">What</th>
              <th className="px-2 py-2 font-medium">Before</th>
              <th className="px-4 py-2 font-medium">After</th>
            </tr>
          </thead>
          <tbody>
            {d.rows.length === 0 && (
              <tr>
                <td colSpan={5} className="px-4 py-6 text-center text-ink-soft">
                  Nothing recorded yet.
                </td>
              </tr>
            )}
            {d.rows.map((r) => (
              <tr key={r.id} className="border-t border-line/70 align-top">
                <td className="px-4 py-2 font-mono text-xs whitespace-nowrap">{r.at.slice(0, 19).replace('T', ' ')}</td>
                <td className="px-2 py-2 text-ink-soft">{r.actor ?? 'system'}</td>
                <td className="px-2 py-2">
                  <span className="font-medium">{r.action}</span>
                  <span className="text-ink-faint">
                    {' '}
                    · {r.entity} {r.entityId}
                  </span>
                </td>
                <td className="max-w-64 px-2 py-2 font-mono text-xs break-all text-ink-soft">{r.before ?? '—'}</td>
                <td className="max-w-64 px-4 py-2 font-mono text-xs break-all">{r.after ?? '—'}</td>
              </tr>
            ))}
          </tbody>
        </table>
      </div>
      <nav aria-label="Pages" className="mt-3 flex items-center justify-between text-sm">
        <span className="text-ink-faint">
          Page {d.page} of {pages}
        </span>
        <span className="flex gap-2">
          {d.page > 1 && <Link className="underline" to={href(d.page - 1)}>Newer</Link>}
          {d.page < pages && <Link className="underline" to={href(d.page + 1)}>Older</Link>}
        </span>
      </nav>
    </div>
  )
}
