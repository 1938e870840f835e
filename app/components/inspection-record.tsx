import type { RecordSite, RecordVisit } from '~/.server/repos/inspection-record'
import { formatDay } from '~/utils/format'
import { siteDateTime } from '~/utils/time-format'

// The printed inspection record: what an authority having jurisdiction looks for, laid out for paper.
// Shared by the one-visit record and the site's record for a period.

type Site = RecordSite
type Visit = RecordVisit
type Detector = Visit['detectors'][number]
type Notice = Visit['notices'][number]
type Loop = NonNullable<Detector['loop']>
type Expected = Loop['rows'][number]['expected']

const TASK_WORDS: Record<string, string> = {
  visual: 'Visual inspection',
  functional: 'Functional test',
  sensitivity: 'Sensitivity test',
  cleaning: 'Cleaning',
  shutdown: 'Unit shutdown check',
  'test-station': 'Remote test station',
}
const RESULT_WORDS: Record<string, string> = { pass: 'Passed', fail: 'Failed', skipped: 'Not tested', pending: 'Not recorded' }
const STANDING: Record<string, string> = {
  pass: 'Passed when the visit closed',
  fail: 'Open: the office follows up',
  skipped: 'Open: to be tested',
  pending: 'Open: no result recorded',
}
const METHOD_WORDS: Record<string, string> = { phone: 'by phone', email: 'by e-mail', portal: 'through their portal' }
const KIND_WORDS: Record<string, string> = {
  inspection: 'Inspection',
  test: 'Test and inspection',
  cleaning: 'Cleaning',
  repair: 'Repair',
  commissioning: 'Commissioning',
}
export const kindWords = (kind: string) => KIND_WORDS[kind] ?? kind
const STATUS_WORDS: Record<string, string> = {
  planned: 'Planned, not yet worked',
  notified: 'Notified, not yet worked',
  'in-progress': 'Under way',
  done: 'Completed',
  cancelled: 'Cancelled',
}

const num = (n: number, places = 2) => Number(n.toFixed(places)).toLocaleString('en-US')
const LOOP_WORDS: Record<string, string> = { normal: 'normal', alarm: 'in alarm', trouble: 'in trouble', unpowered: 'power off' }
const ohms = (r: number | 'open') => (r === 'open' ? 'open' : `${num(r, 1)} Ω`)
const expectedWords = (e: Expected) => ('open' in e ? 'open' : `${num(e.min, 1)} – ${num(e.max, 1)} Ω`)

// The site's clock with its zone's usual letters (CST, PDT), as on the detector page.
function at(iso: string | null, timeZone: string) {
  return iso ? siteDateTime(iso, timeZone) : '—'
}

const location = (d: Detector) =>
  `${d.unitTag} ${d.position === 'supply' ? 'supply' : 'return'} duct${d.unitLocation ? `, ${d.unitLocation}` : ''}`

/** Anything on a detector that did not pass: its result, a failed task, a loop or a reading out of range. */
export function problemsOf(d: Detector): string[] {
  const out: string[] = []
  if (d.result === 'fail' || d.result === 'skipped') out.push(`${RESULT_WORDS[d.result]} at this visit`)
  for (const t of d.tests) if (t.outcome === 'fail') out.push(`${TASK_WORDS[t.task] ?? t.task} failed${t.value !== null ? ` (${num(t.value)})` : ''}`)
  if (d.loop?.verdict === 'fail') out.push(...d.loop.findings)
  for (const m of d.measures) if (m.status === 'too-low' || m.status === 'too-high') out.push(`${m.what} ${num(m.value, 3)} ${m.unit} is ${m.status === 'too-low' ? 'below' : 'above'} the listed ${num(m.min!, 3)} – ${num(m.max!, 3)} ${m.unit}`)
  return out
}

export function RecordCaution() {
  return (
    <p className="record-caution text-xs text-ink-soft">
      Keep this record as NFPA 72 (section 14.6, records) and local requirements direct. Local codes, the authority having
      jurisdiction (AHJ), the device&apos;s listing and instructions, and licensed practice take precedence; defer to the AHJ.
      Fire alarm panels and alarm wiring are the fire alarm contractor&apos;s work.
    </p>
  )
}

export function PropertyBlock({ site, company }: { site: Site; company: string }) {
  return (
    <dl className="record-facts">
      <dt>Property</dt>
      <dd>
        <strong>{site.name}</strong> · {site.customer}
      </dd>
      <dt>Address</dt>
      <dd>
        {site.street}, {site.city}, {site.region.replace(/^US-/, '')} {site.postalCode}
      </dd>
      <dt>Jurisdiction</dt>
      <dd>
        {site.jurisdiction} · {site.ahjName}
      </dd>
      <dt>Monitoring</dt>
      <dd>
        {site.monitoring ?? 'None on file'}
        {site.monitoringAccount ? ` · account ${site.monitoringAccount}` : ''}
      </dd>
      <dt>Contractor</dt>
      <dd>{company}</dd>
    </dl>
  )
}

function NoticeBlock({ notices, timeZone }: { notices: Notice[]; timeZone: string }) {
  if (notices.length === 0) {
    return <p className="text-sm">No notice to the monitoring company is recorded for this visit.</p>
  }
  return (
    <table className="record-table">
      <thead>
        <tr>
          <th>Monitoring company told</th>
          <th>Confirmation</th>
          <th>System in test</th>
          <th>All-clear</th>
        </tr>
      </thead>
      <tbody>
        {notices.map((n) => (
          <tr key={n.id}>
            <td>
              {n.company ?? 'Monitoring company'} {METHOD_WORDS[n.method] ?? n.method}, {at(n.notifiedAt, timeZone)}
              <br />
              spoke with {n.spokeWith}
              {n.notifiedBy ? `; given by ${n.notifiedBy}` : ''}
              {n.siteContactTold ? `; site told: ${n.siteContactTold}` : ''}
            </td>
            <td className="font-mono">{n.confirmation ?? '—'}</td>
            <td>
              {at(n.inTestFrom, timeZone)} to
              <br />
              {at(n.inTestUntil, timeZone)}
            </td>
            <td>
              {n.clearedAt ? (
                <>
                  {at(n.clearedAt, timeZone)}
                  {n.clearedWith ? `, confirmed by ${n.clearedWith}` : ''}
                  {n.clearedBy ? `; logged by ${n.clearedBy}` : ''}
                </>
              ) : (
                'Not recorded'
              )}
            </td>
          </tr>
        ))}
      </tbody>
    </table>
  )
}

function DetectorBlock({ d }: { d: Detector }) {
  return (
    <article className="record-detector" aria-label={`Detector ${d.tag}`}>
      <header className="record-detector-head">
        <span className="font-semibold">{d.tag}</span>
        <span>{location(d)}</span>
        <span>
          {d.model} · serial <span className="font-mono">{d.serial ?? 'not recorded'}</span>
        </span>
        <span className={`record-result record-result-${d.result}`}>{RESULT_WORDS[d.result] ?? d.result}</span>
      </header>
      <div className="record-detector-body">
        <table className="record-table record-table-tight">
          <thead>
            <tr>
              <th>Work</th>
              <th>Outcome</th>
            </tr>
          </thead>
          <tbody>
            {d.tasks.map((task) => {
              const done = d.tests.filter((t) => t.task === task)
              return (
                <tr key={task}>
                  <td>{TASK_WORDS[task] ?? task}</td>
                  <td>
                    {done.length === 0
                      ? 'No result recorded'
                      : done.map((t) => (t.outcome === 'pass' ? (task === 'cleaning' ? 'Done' : 'Passed') : 'Failed')).join(', ')}
                  </td>
                </tr>
              )
            })}
          </tbody>
        </table>
        {(d.loop || d.measures.length > 0) && (
          <table className="record-table record-table-tight">
            <thead>
              <tr>
                <th>Measured</th>
                <th>Reading</th>
                <th>Expected</th>
                <th />
              </tr>
            </thead>
            <tbody>
              {d.loop?.rows.map((r) => (
                <tr key={r.state}>
                  <td>Loop at the panel, {LOOP_WORDS[r.state]}</td>
                  <td className="font-mono whitespace-nowrap">{ohms(r.reading)}</td>
                  <td className="font-mono whitespace-nowrap">{expectedWords(r.expected)}</td>
                  <td className="whitespace-nowrap">{r.inRange ? 'in range' : <strong>out of range</strong>}</td>
                </tr>
              ))}
              {d.loop && d.loop.rows.length > 0 && (
                <tr data-loop-read-by="">
                  <td colSpan={4}>Loop read at the panel by {d.loop.readBy ?? 'not recorded'}</td>
                </tr>
              )}
              {d.measures.map((m) => (
                <tr key={m.what}>
                  <td>{m.what}</td>
                  <td className="font-mono whitespace-nowrap">
                    {num(m.value, 3)} {m.unit}
                  </td>
                  <td className="font-mono whitespace-nowrap">
                    {m.min !== null && m.max !== null ? `${num(m.min, 3)} – ${num(m.max, 3)} ${m.unit}` : m.unit === '%/ft' ? 'per the listing' : '—'}
                  </td>
                  <td className="whitespace-nowrap">
                    {m.status === 'in-range' ? 'in range' : m.status === 'no-listing' ? '' : <strong>{m.status === 'too-low' ? 'below range' : 'above range'}</strong>}
                  </td>
                </tr>
              ))}
            </tbody>
          </table>
        )}
      </div>
      {(d.findings.length > 0 || d.notes) && (
        <p className="record-detector-notes">
          {d.findings.map((f) => `${f.label}: ${f.value}`).join(' · ')}
          {d.findings.length > 0 && d.notes ? ' · ' : ''}
          {d.notes ? `Notes: ${d.notes}` : ''}
        </p>
      )}
    </article>
  )
}

function SignatureLines({ technician }: { technician: string | null }) {
  return (
    <div className="record-signatures">
      <div>
        <div className="record-line" />
        <div>Technician{technician ? `: ${technician}` : ''}</div>
        <div className="record-line record-line-short" />
        <div>Date</div>
      </div>
      <div>
        <div className="record-line" />
        <div>Site representative (name and signature)</div>
        <div className="record-line record-line-short" />
        <div>Date</div>
      </div>
    </div>
  )
}

/** One visit's record, ready for paper. */
export function VisitRecordSheet({ site, company, visit }: { site: Site; company: string; visit: Visit }) {
  const tz = site.timeZone
  const problems = visit.detectors.map((d) => ({ d, list: problemsOf(d) })).filter((p) => p.list.length > 0)
  const passed = visit.detectors.filter((d) => d.result === 'pass').length
  return (
    <section className="record-sheet" aria-label={`Inspection record, ${formatDay(visit.scheduledOn)}`}>
      {/* A table only so the printed head repeats at the top of every page the visit runs onto. */}
      <table className="record-frame">
        <thead className="record-running">
          <tr>
            <td>
              {site.name}, {site.street}, {site.city} · visit of {formatDay(visit.scheduledOn)} · {company}
            </td>
          </tr>
        </thead>
        <tbody>
          <tr>
            <td>
              <header className="record-title">
                <div>
                  <h1>Duct smoke detector inspection and test record</h1>
                  <p>
                    {company} · visit {visit.id}
                  </p>
                </div>
                <div className="text-right">
                  <div className="font-semibold">{formatDay(visit.scheduledOn)}</div>
                  <div>{kindWords(visit.kind)}</div>
                </div>
              </header>

              <div className="record-columns">
                <PropertyBlock site={site} company={company} />
                <dl className="record-facts">
                  <dt>Date of visit</dt>
                  <dd>{formatDay(visit.scheduledOn)}</dd>
                  <dt>Status</dt>
                  <dd>{STATUS_WORDS[visit.status] ?? visit.status}</dd>
                  <dt>On site</dt>
                  <dd>
                    {visit.startedAt ? at(visit.startedAt, tz) : visit.windowFrom ? `window ${visit.windowFrom}–${visit.windowUntil ?? ''}` : 'Times not recorded'}
                    {visit.completedAt ? ` to ${at(visit.completedAt, tz)}` : ''}
                  </dd>
                  <dt>Tested by</dt>
                  <dd>
                    {visit.technician ?? 'Not recorded'}, {company}
                  </dd>
                  <dt>Devices</dt>
                  <dd>
                    {visit.detectors.length} on this visit · {passed} passed · {problems.length} with a problem
                  </dd>
                </dl>
              </div>

              <h2>Notice to the monitoring company</h2>
              <NoticeBlock notices={visit.notices} timeZone={tz} />

              <h2>Devices, tests and readings</h2>
              {visit.detectors.length === 0 ? <p className="text-sm">No devices are listed on this visit.</p> : visit.detectors.map((d) => <DetectorBlock key={d.id} d={d} />)}

              <h2>Problems found and what was done</h2>
              {problems.length === 0 ? (
                <p className="text-sm">No problems were found on this visit.</p>
              ) : (
                <table className="record-table">
                  <thead>
                    <tr>
                      <th>Device</th>
                      <th>Problem</th>
                      <th>Technician&apos;s reason and action</th>
                      <th>Standing</th>
                    </tr>
                  </thead>
                  <tbody>
                    {problems.map(({ d, list }) => (
                      <tr key={d.id}>
                        <td>
                          <strong>{d.tag}</strong>
                          <br />
                          {location(d)}
                        </td>
                        <td>
                          <ul>
                            {list.map((p, i) => (
                              <li key={i}>{p}</li>
                            ))}
                          </ul>
                        </td>
                        <td>
                          {d.reason ?? 'No reason recorded'}
                          {d.notes ? <><br />{d.notes}</> : null}
                        </td>
                        <td>{STANDING[d.result] ?? d.result}</td>
                      </tr>
                    ))}
                  </tbody>
                </table>
              )}

              {visit.notes && (
                <>
                  <h2>Visit notes</h2>
                  <p className="text-sm">{visit.notes}</p>
                </>
              )}

              <SignatureLines technician={visit.technician} />
              <RecordCaution />
            </td>
          </tr>
        </tbody>
      </table>
    </section>
  )
}
