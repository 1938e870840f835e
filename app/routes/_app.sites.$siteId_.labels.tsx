import QRCode from 'qrcode'
import { Breadcrumb } from '~/components/breadcrumb'
import { requireUser } from '~/.server/auth'
import { getDb } from '~/.server/db'
import { env } from '~/.server/env'
import { siteLabelRows } from '~/.server/repos/inspection-record'
import { pageNotFound, pageRecordId } from '~/.server/repos/record-id'
import { PrintButton } from '~/components/print-button'
import type { RouteAccess } from '~/domain/permissions'
import type { Route } from './+types/_app.sites.$siteId_.labels'
import '~/print.css'

export const handle = { access: { loader: 'view:fleet' } satisfies RouteAccess }

export const meta: Route.MetaFunction = ({ data }) => [{ title: data ? `Labels · ${data.site.name} · Ductkeeper` : 'Labels · Ductkeeper' }]

// 3 across and 8 down: one sheet of 63.5 × 33 mm labels on Letter or A4.
const PER_SHEET = 24

export async function loader({ request, params }: Route.LoaderArgs) {
  await requireUser(request, 'view:fleet')
  const found = siteLabelRows(getDb(), pageRecordId(params, 'siteId', 'site'))
  if (!found) throw pageNotFound('site')
  // The public origin when one is set: a label outlives whichever address the office printed it from.
  const origin = env.APP_URL ? new URL(env.APP_URL).origin : new URL(request.url).origin
  const labels = await Promise.all(
    found.detectors.map(async (d) => {
      const url = `${origin}/devices/${d.id}`
      return { ...d, url, qr: await QRCode.toString(url, { type: 'svg', margin: 0, errorCorrectionLevel: 'M' }) }
    }),
  )
  return { site: found.site, labels }
}

export default function Labels({ loaderData }: Route.ComponentProps) {
  const { site, labels } = loaderData
  const sheets = Array.from({ length: Math.ceil(labels.length / PER_SHEET) }, (_, i) => labels.slice(i * PER_SHEET, (i + 1) * PER_SHEET))
  return (
    <div className="print-root label-root mx-auto max-w-5xl">
      <div className="no-print mb-4 flex flex-wrap items-center justify-between gap-3">
        <div>
          <Breadcrumb items={[{ to: `/sites/${site.id}`, name: site.name }]} here="Labels" />
          <p className="mt-1 text-sm text-ink-soft">
            {labels.length} {labels.length === 1 ? 'label' : 'labels'} on {sheets.length} {sheets.length === 1 ? 'sheet' : 'sheets'} of 3 × 8
            (63.5 × 33 mm, Letter or A4). Print at actual size; the scan opens the detector&apos;s page.
          </p>
        </div>
        <PrintButton label="Print labels" />
      </div>
      {labels.length === 0 && <p className="text-sm">This site has no detectors on record.</p>}
      {sheets.map((sheet, i) => (
        <div key={i} className="label-page" aria-label={`Label sheet ${i + 1}`}>
          {sheet.map((l) => (
            <div key={l.id} className="label" data-detector-id={l.id}>
              <div className="label-qr" role="img" aria-label={`QR code for ${l.url}`} dangerouslySetInnerHTML={{ __html: l.qr }} />
              <div className="label-text">
                <div className="label-tag">{l.tag}</div>
                <div>
                  {l.unitTag} · {l.position} duct
                </div>
                <div>{site.name}</div>
                {l.serial && <div className="font-mono">S/N {l.serial}</div>}
                <div className="mt-0.5 text-[6pt]">Duct smoke detector · scan for its record</div>
              </div>
            </div>
          ))}
        </div>
      ))}
    </div>
  )
}
