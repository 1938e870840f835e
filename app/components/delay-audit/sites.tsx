import { Link } from 'react-router'
import { beyondTroubleLimit } from '~/domain/delay-audit'
import { formatCount } from '~/utils/format'

interface Site {
  id: number
  name: string
  city: string
  region: string
  policySeconds: number
  count: number
  detectors: Array<{ id: number; tag: string; delaySeconds: number | null; delayObservedOn: string | null; advice: string }>
}

const setting = (s: number | null) => (s === null ? 'not recorded' : s === 0 ? 'at once' : s % 60 === 0 ? `${s / 60} min` : `${s} s`)
const TITLES = { agree: 'Agreeing detectors', disagree: 'Disagreeing detectors', unknown: 'Detectors never recorded' } as const

/** The detectors of one outcome grouped by site, a page of sites at a time, each tickable for the actions above. */
export function AuditSites(p: {
  page: { outcome: keyof typeof TITLES; page: number; pages: number; siteCount: number; sites: Site[]; limitSeconds: number }
  chosen: number[]
  onChoose: (ids: number[]) => void
}) {
  const { page } = p
  const chosen = new Set(p.chosen)
  const toggle = (ids: number[], on: boolean) => {
    const next = new Set(chosen)
    for (const id of ids) {
      if (on) next.add(id)
      else next.delete(id)
    }
    p.onChoose([...next])
  }
  return (
    <section aria-labelledby="sites-h" className="space-y-3">
      <div className="flex flex-wrap items-baseline justify-between gap-2">
        <h2 id="sites-h" className="font-semibold">
          {TITLES[page.outcome]} by site
        </h2>
        <p className="text-sm text-ink-faint">
          {formatCount(page.siteCount)} site{page.siteCount === 1 ? '' : 's'} · page {page.page} of {page.pages}
        </p>
      </div>
      {page.sites.length === 0 && <p className="text-sm text-ink-soft">None.</p>}
      {page.sites.map((s) => {
        const ids = s.detectors.map((d) => d.id)
        const all = ids.every((id) => chosen.has(id))
        return (
          <article key={s.id} aria-label={s.name} className="rounded-md border border-line bg-panel">
            <header className="flex flex-wrap items-center justify-between gap-2 border-b border-line px-3 py-2">
              <label className="flex min-h-11 items-center gap-2 font-medium sm:min-h-9">
                <input type="checkbox" className="size-4" checked={all} onChange={(e) => toggle(ids, e.target.checked)} aria-label={`Choose every detector at ${s.name}`} />
                <Link to={`/sites/${s.id}`} className="underline">
                  {s.name}
                </Link>
              </label>
              <span className="text-xs text-ink-soft">
                {s.city}, {s.region} · policy {setting(s.policySeconds)} · {formatCount(s.count)} detector{s.count === 1 ? '' : 's'}
                {beyondTroubleLimit(s.policySeconds) && <strong className="ml-2 text-late">past {page.limitSeconds} s: verify with the AHJ</strong>}
              </span>
            </header>
            <ul className="divide-y divide-line/60">
              {s.detectors.map((d) => (
                <li key={d.id} className="grid grid-cols-[auto_1fr] items-start gap-x-2 px-3 py-1.5 text-sm sm:grid-cols-[auto_10rem_8rem_8rem_1fr]">
                  <input
                    type="checkbox"
                    className="mt-1 size-4"
                    checked={chosen.has(d.id)}
                    onChange={(e) => toggle([d.id], e.target.checked)}
                    aria-label={`Choose ${d.tag}`}
                  />
                  <Link to={`/devices/${d.id}`} className="font-mono underline">
                    {d.tag}
                  </Link>
                  <span className="col-start-2 sm:col-start-auto">
                    set {setting(d.delaySeconds)}
                    {beyondTroubleLimit(d.delaySeconds) && <span className="ml-1 text-late">(past {page.limitSeconds} s: verify with the AHJ)</span>}
                  </span>
                  <span className="col-start-2 text-ink-soft sm:col-start-auto">{d.delayObservedOn ? `seen ${d.delayObservedOn}` : 'never seen'}</span>
                  <span className="col-start-2 text-xs text-ink-soft sm:col-start-auto">{d.advice}</span>
                </li>
              ))}
            </ul>
          </article>
        )
      })}
      {page.pages > 1 && (
        <nav aria-label="Pages of sites" className="flex items-center gap-3 text-sm">
          {page.page > 1 && (
            <Link className="inline-flex min-h-11 items-center text-accent underline sm:min-h-9" to={`?outcome=${page.outcome}&page=${page.page - 1}`}>
              Previous sites
            </Link>
          )}
          {page.page < page.pages && (
            <Link className="inline-flex min-h-11 items-center text-accent underline sm:min-h-9" to={`?outcome=${page.outcome}&page=${page.page + 1}`}>
              Next sites
            </Link>
          )}
        </nav>
      )}
    </section>
  )
}
