import { data, redirect } from 'react-router'
import { Breadcrumb } from '~/components/breadcrumb'
import { requireUser } from '~/.server/auth'
import { getDb } from '~/.server/db'
import { editableRecord, editFromRequest, monitoringChoices, siteContext } from '~/.server/repos/record-edits'
import { pageNotFound, pageRecordId } from '~/.server/repos/record-id'
import { CheckField, NumberField, RecordForm, Section, SelectField, TextAreaField, TextField, type EditAnswer } from '~/components/forms/record-form'
import type { RouteAccess } from '~/domain/permissions'
import { TROUBLE_REPORTING_SECONDS } from '~/domain/delay-audit'
import { siteCautions, siteForm, type SiteForm } from '~/domain/record-forms'
import type { Route } from './+types/_app.sites.$siteId_.edit'

export const handle = { access: { loader: 'edit:records', action: 'edit:records' } satisfies RouteAccess }

export const meta: Route.MetaFunction = ({ data }) => [{ title: data ? `Edit ${data.site.name} · Ductkeeper` : 'Edit site · Ductkeeper' }]

export async function loader({ request, params }: Route.LoaderArgs) {
  await requireUser(request, 'edit:records')
  const id = pageRecordId(params, 'siteId', 'site')
  const db = getDb()
  const record = editableRecord(db, 'site', id)
  const site = siteContext(db, id)
  if (!record || !site) throw pageNotFound('site')
  return { record, site, companies: monitoringChoices(db), timeZones: Intl.supportedValuesOf('timeZone') }
}

export async function action({ request, params }: Route.ActionArgs) {
  const user = await requireUser(request, 'edit:records')
  const id = pageRecordId(params, 'siteId', 'site')
  const outcome = await editFromRequest(request, 'site', user.id, id)
  if (outcome.status === 200) return redirect(`/sites/${id}`)
  return data(outcome, { status: outcome.status })
}

const LABELS: Record<keyof SiteForm, string> = {
  name: 'Site name',
  street: 'Street address',
  city: 'Town or city',
  region: 'Region',
  postalCode: 'Postal code',
  timeZone: 'Time zone',
  jurisdiction: 'Jurisdiction',
  ahjName: 'Authority having jurisdiction (AHJ)',
  ahjContact: 'AHJ contact',
  codeBasis: 'Code basis',
  monitoringCompanyId: 'Monitoring company',
  monitoringAccount: 'Monitoring account number',
  delayPolicySeconds: 'Agreed reporting delay',
  keepsNuisanceRecords: 'The site keeps a record of nuisance alarms',
  accessNotes: 'Access notes',
}

const CODE_BASES = [
  { value: 'imc', label: 'International Mechanical Code (IMC)' },
  { value: 'nfpa90a', label: 'NFPA 90A' },
]

export default function EditSite({ loaderData, actionData }: Route.ComponentProps) {
  const { record, site, companies, timeZones } = loaderData
  return (
    <div className="mx-auto max-w-3xl">
      <Breadcrumb
        items={[
          { to: `/customers/${site.customerId}`, name: site.customer },
          { to: `/sites/${site.id}`, name: site.name },
        ]}
        here="Edit"
      />
      <h1 className="mt-1 mb-4 text-2xl font-semibold">Edit site</h1>
      <RecordForm
        key={record.version}
        record={record}
        schema={siteForm}
        cautions={siteCautions}
        answer={actionData as EditAnswer | undefined}
        labels={LABELS}
        cancelTo={`/sites/${site.id}`}
        what="site"
      >
        <Section title="Site and address">
          <TextField name="name" label={LABELS.name} wide />
          <TextField name="street" label={LABELS.street} wide autoComplete="street-address" />
          <TextField name="city" label={LABELS.city} autoComplete="address-level2" />
          <TextField name="postalCode" label={LABELS.postalCode} autoComplete="postal-code" mono />
          <TextField name="region" label={LABELS.region} hint="ISO 3166-2 code, such as US-OR. Picks the public holidays." mono />
          <TimeZoneField zones={timeZones} />
          <TextAreaField name="accessNotes" label={LABELS.accessNotes} hint="Keys, roof access, who lets you in." />
        </Section>
        <Section title="Code and authority" note="Which code decides where detectors are required here. Verify with the AHJ.">
          <SelectField name="codeBasis" label={LABELS.codeBasis} options={CODE_BASES} />
          <TextField name="jurisdiction" label={LABELS.jurisdiction} />
          <TextField name="ahjName" label={LABELS.ahjName} />
          <TextField name="ahjContact" label={LABELS.ahjContact} hint="Telephone or e-mail." />
          <CheckField
            name="keepsNuisanceRecords"
            label={LABELS.keepsNuisanceRecords}
            hint="Only then may a detector found in range at three sensitivity tests in a row be tested every 5 years instead of every other year (NFPA 72 14.4.5.3.2). Leave it clear unless such a log is kept."
            wide
          />
        </Section>
        <Section title="Monitoring" note="Who watches the fire alarm system and must be told before any work.">
          <SelectField name="monitoringCompanyId" label={LABELS.monitoringCompanyId} options={companies.map((c) => ({ value: c.id, label: c.name }))} blank="None on record" wide />
          <TextField name="monitoringAccount" label={LABELS.monitoringAccount} mono />
          <NumberField
            name="delayPolicySeconds"
            label={LABELS.delayPolicySeconds}
            unit="s"
            hint={`As agreed with the monitoring company: 0 reports at once, 180 is 3 min. NFPA 72 gives ${TROUBLE_REPORTING_SECONDS} s for a trouble.`}
          />
        </Section>
      </RecordForm>
    </div>
  )
}

function TimeZoneField({ zones }: { zones: string[] }) {
  return (
    <>
      <TextField name="timeZone" label={LABELS.timeZone} hint="Such as America/Chicago: the site's working day." mono list="time-zones" />
      <datalist id="time-zones">
        {zones.map((z) => (
          <option key={z} value={z} />
        ))}
      </datalist>
    </>
  )
}
