import { useState } from 'react'
import { requireUser } from '~/.server/auth'
import { getDb } from '~/.server/db'
import { importMappings } from '~/.server/schema'
import { MappingForm } from '~/components/import/mapping-form'
import { ProgressBar } from '~/components/import/progress-bar'
import { ReportView } from '~/components/import/report-view'
import { checkFile, commitFile, discardFile, uploadFile, type Report, type Uploaded } from '~/components/import/send'
import { buttonClass, Field, inputClass, Notice, PageHeader, quietButtonClass } from '~/components/ui/page-header'
import type { RouteAccess } from '~/domain/permissions'
import type { Route } from './+types/_app.import'

export const handle = { access: { loader: 'edit:records' } satisfies RouteAccess }

export const meta: Route.MetaFunction = () => [{ title: 'Import · Ductkeeper' }]

export async function loader({ request }: Route.LoaderArgs) {
  await requireUser(request, 'edit:records')
  // Remembered mappings are kept as 'kind:source'; the names are offered for the next file.
  const rows = getDb().select({ source: importMappings.source, kind: importMappings.kind }).from(importMappings).all()
  return { sources: rows.filter((r) => r.source.startsWith(`${r.kind}:`)).map((r) => ({ kind: r.kind, source: r.source.slice(r.kind.length + 1) })) }
}

type Step =
  | { kind: 'choose' }
  | { kind: 'uploading'; share: number }
  | { kind: 'map'; upload: Uploaded }
  | { kind: 'checking'; upload: Uploaded; rows: number }
  | { kind: 'review'; upload: Uploaded; report: Report }
  | { kind: 'writing'; upload: Uploaded; report: Report }
  | { kind: 'done'; report: Report; fileName: string }

const KIND_WORDS = {
  inventory: { title: 'Equipment inventory', what: 'one row per detector, with its unit, site and customer' },
  events: { title: 'Event history', what: 'one row per signal: site or monitoring account, detector tag, time, kind, detail' },
} as const

export default function ImportPage({ loaderData }: Route.ComponentProps) {
  const [step, setStep] = useState<Step>({ kind: 'choose' })
  const [fileKind, setFileKind] = useState<'inventory' | 'events'>('inventory')
  const [mapping, setMapping] = useState<Uploaded['mapping']>({})
  const [error, setError] = useState<string | null>(null)

  const fail = (e: unknown, back: Step) => {
    setError(e instanceof Error ? e.message : String(e))
    setStep(back)
  }

  const send = async (form: HTMLFormElement) => {
    setError(null)
    const body = new FormData(form)
    setStep({ kind: 'uploading', share: 0 })
    try {
      const upload = await uploadFile(body, (share) => setStep({ kind: 'uploading', share }))
      setMapping(upload.mapping)
      setStep({ kind: 'map', upload })
    } catch (e) {
      fail(e, { kind: 'choose' })
    }
  }

  const check = async (upload: Uploaded) => {
    setError(null)
    setStep({ kind: 'checking', upload, rows: 0 })
    try {
      const report = await checkFile(upload.id, mapping, (rows) => setStep({ kind: 'checking', upload, rows }))
      setStep({ kind: 'review', upload, report })
    } catch (e) {
      fail(e, { kind: 'map', upload })
    }
  }

  const confirm = async (upload: Uploaded, report: Report) => {
    setError(null)
    setStep({ kind: 'writing', upload, report })
    try {
      setStep({ kind: 'done', report: await commitFile(upload.id, mapping), fileName: upload.fileName })
    } catch (e) {
      fail(e, { kind: 'review', upload, report })
    }
  }

  const startOver = async (upload?: Uploaded) => {
    setError(null)
    if (upload) await discardFile(upload.id).catch(() => {})
    setStep({ kind: 'choose' })
  }

  const current = 'upload' in step ? step.upload : null
  return (
    <div className="mx-auto max-w-5xl">
      <PageHeader title="Import">Check first; nothing is written until you confirm.</PageHeader>
      {error && <Notice tone="error">{error}</Notice>}

      {current && (
        <p className="mb-3 text-sm text-ink-soft">
          <span className="font-medium text-ink">{current.fileName}</span> · {KIND_WORDS[current.kind].title} from {current.source} · {current.rows.toLocaleString()} rows
        </p>
      )}

      {(step.kind === 'choose' || step.kind === 'uploading') && (
        <form
          className="grid gap-4 rounded-md border border-line bg-panel p-4"
          onSubmit={(e) => {
            e.preventDefault()
            void send(e.currentTarget)
          }}
        >
          <fieldset className="grid gap-2">
            <legend className="mb-1 text-xs font-medium text-ink-soft">The file holds</legend>
            {(['inventory', 'events'] as const).map((k) => (
              <label key={k} className="flex items-start gap-2 text-sm">
                <input type="radio" name="kind" value={k} checked={fileKind === k} onChange={() => setFileKind(k)} className="mt-1" />
                <span>
                  <span className="font-medium">{KIND_WORDS[k].title}</span>
                  <span className="block text-ink-soft">{KIND_WORDS[k].what}</span>
                </span>
              </label>
            ))}
          </fieldset>
          <Field label={fileKind === 'inventory' ? 'Source (the customer or list it came from)' : 'Source (the monitoring company)'}>
            <input name="source" required maxLength={120} list="import-sources" className={inputClass} autoComplete="off" />
            <datalist id="import-sources">
              {loaderData.sources
                .filter((s) => s.kind === fileKind)
                .map((s) => (
                  <option key={s.source} value={s.source} />
                ))}
            </datalist>
          </Field>
          <Field label="CSV file (UTF-8, comma or semicolon separated, first row the column names)">
            <input name="file" type="file" required accept=".csv,text/csv" className="text-sm file:mr-3 file:rounded-sm file:border file:border-line-strong file:bg-sunken file:px-2.5 file:py-1 file:text-sm" />
          </Field>
          {step.kind === 'uploading' ? (
            <ProgressBar label="Uploading and reading the file" share={step.share} />
          ) : (
            <div>
              <button type="submit" className={buttonClass}>
                Upload and map columns
              </button>
            </div>
          )}
          <p className="text-xs text-ink-faint">A column of the same name as a field is matched for you; a mapping you confirm is remembered for the source.</p>
        </form>
      )}

      {(step.kind === 'map' || step.kind === 'checking') && (
        <section aria-labelledby="map-h">
          <h2 id="map-h" className="mb-1 font-semibold">
            Match the columns
          </h2>
          <p className="mb-3 text-sm text-ink-soft">
            {step.upload.remembered ? 'As mapped for this source last time.' : 'Guessed from the column names; check each.'} Fields other than those on every row are needed only for a new
            record; a blank cell leaves a stored value as it is.
          </p>
          <MappingForm upload={step.upload} mapping={mapping} onChange={setMapping} />
          {step.kind === 'checking' ? (
            <ProgressBar label="Checking every row" share={step.rows / step.upload.rows} detail={`${step.rows.toLocaleString()} of ${step.upload.rows.toLocaleString()} rows`} />
          ) : (
            <div className="mt-4 flex flex-wrap gap-2">
              <button type="button" className={buttonClass} onClick={() => void check(step.upload)}>
                Check the file
              </button>
              <button type="button" className={quietButtonClass} onClick={() => void startOver(step.upload)}>
                Discard
              </button>
            </div>
          )}
        </section>
      )}

      {(step.kind === 'review' || step.kind === 'writing') && (
        <section aria-labelledby="review-h">
          <h2 id="review-h" className="mb-2 font-semibold">
            What the import would do
          </h2>
          <ReportView report={step.report} />
          <div className="sticky bottom-0 mt-4 flex flex-wrap items-center gap-2 border-t border-line bg-paper py-3">
            <button type="button" className={buttonClass} disabled={step.kind === 'writing' || nothingToWrite(step.report)} onClick={() => void confirm(step.upload, step.report)}>
              {step.kind === 'writing' ? 'Writing…' : confirmLabel(step.report)}
            </button>
            <button type="button" className={quietButtonClass} disabled={step.kind === 'writing'} onClick={() => setStep({ kind: 'map', upload: step.upload })}>
              Change the mapping
            </button>
            <button type="button" className={quietButtonClass} disabled={step.kind === 'writing'} onClick={() => void startOver(step.upload)}>
              Discard
            </button>
            {step.report.counts.skippedRows > 0 && <span className="text-xs text-ink-soft">Rows with problems are left out; correct them and import the file again.</span>}
          </div>
        </section>
      )}

      {step.kind === 'done' && (
        <section aria-labelledby="done-h">
          <Notice tone="ok">
            Imported {step.fileName}. The changes are in the audit log; detectors added or changed were re-derived.
          </Notice>
          <h2 id="done-h" className="sr-only">
            Result
          </h2>
          <ReportView report={step.report} />
          <button type="button" className={`${buttonClass} mt-4`} onClick={() => void startOver()}>
            Import another file
          </button>
        </section>
      )}
    </div>
  )
}

const ADDS = ['customersAdded', 'customersUpdated', 'sitesAdded', 'sitesUpdated', 'unitsAdded', 'unitsUpdated', 'detectorsAdded', 'detectorsUpdated', 'eventsAdded']
const nothingToWrite = (r: Report) => ADDS.every((k) => !r.counts[k])

function confirmLabel(r: Report): string {
  if (nothingToWrite(r)) return 'Nothing to write'
  const n = r.counts.rows - r.counts.skippedRows
  return `Write ${n.toLocaleString()} row${n === 1 ? '' : 's'}`
}
