import { useState } from 'react'
import { Breadcrumb } from '~/components/breadcrumb'
import { data, redirect } from 'react-router'
import { requireUser } from '~/.server/auth'
import { getDb } from '~/.server/db'
import { editableRecord, editFromRequest, unitContext } from '~/.server/repos/record-edits'
import { pageNotFound, pageRecordId } from '~/.server/repos/record-id'
import { CheckField, NumberField, RecordForm, Section, SelectField, TextField, type EditAnswer } from '~/components/forms/record-form'
import type { RouteAccess } from '~/domain/permissions'
import { unitCautions, unitForm, type UnitForm } from '~/domain/record-forms'
import type { Route } from './+types/_app.units.$unitId_.edit'

export const handle = { access: { loader: 'edit:records', action: 'edit:records' } satisfies RouteAccess }

export const meta: Route.MetaFunction = ({ data }) => [{ title: data ? `Edit ${data.unit.tag} · ${data.unit.site} · Ductkeeper` : 'Edit unit · Ductkeeper' }]

export async function loader({ request, params }: Route.LoaderArgs) {
  await requireUser(request, 'edit:records')
  const id = pageRecordId(params, 'unitId', 'unit')
  const db = getDb()
  const record = editableRecord(db, 'unit', id)
  const unit = unitContext(db, id)
  if (!record || !unit) throw pageNotFound('unit')
  return { record, unit }
}

export async function action({ request, params }: Route.ActionArgs) {
  const user = await requireUser(request, 'edit:records')
  const id = pageRecordId(params, 'unitId', 'unit')
  const outcome = await editFromRequest(request, 'unit', user.id, id)
  if (outcome.status === 200) return redirect(`/units/${id}`)
  return data(outcome, { status: outcome.status })
}

const LABELS: Record<keyof UnitForm, string> = {
  tag: 'Unit tag',
  kind: 'Kind of unit',
  location: 'Location',
  shutdownInput: 'Shutdown input',
  supplyCfm: 'Supply airflow',
  returnCfm: 'Return airflow',
  ductShape: 'Duct shape',
  ductWidthIn: 'Duct width',
  ductHeightIn: 'Duct height',
  ductDiameterIn: 'Duct diameter',
  storeysServed: 'Storeys served',
  storeyReturnDetectors: 'Return detectors, one per storey',
  sharedPlenum: 'Shares a supply or return plenum with other units',
  areaDetection: 'Area smoke detection covers every space it serves',
  transformerVa: 'Control transformer',
}

const KINDS = [
  { value: 'rtu', label: 'Rooftop unit (RTU)' },
  { value: 'ahu', label: 'Air handler (AHU)' },
  { value: 'mau', label: 'Make-up air unit (MAU)' },
  { value: 'erv', label: 'Energy recovery ventilator (ERV)' },
  { value: 'fcu', label: 'Fan coil unit (FCU)' },
]
const INPUTS = [
  { value: 'break-to-stop', label: 'Break to stop' },
  { value: 'make-to-stop', label: 'Make to stop' },
]
const SHAPES = [
  { value: 'rectangular', label: 'Rectangular' },
  { value: 'round', label: 'Round' },
]

export default function EditUnit({ loaderData, actionData }: Route.ComponentProps) {
  const { record, unit } = loaderData
  // Only the sizes of the chosen shape are asked for; the server keeps only those.
  const [shape, setShape] = useState(String(record.ductShape))
  return (
    <div className="mx-auto max-w-3xl">
      <Breadcrumb
        items={[
          { to: `/sites/${unit.siteId}`, name: unit.site },
          { to: `/units/${unit.id}`, name: unit.tag, mono: true },
        ]}
        here="Edit"
      />
      <h1 className="mt-1 mb-4 text-2xl font-semibold">Edit unit</h1>
      <RecordForm key={record.version} record={record} schema={unitForm} cautions={unitCautions} answer={actionData as EditAnswer | undefined} labels={LABELS} cancelTo={`/units/${unit.id}`} what="unit">
        <Section title="Unit">
          <TextField name="tag" label={LABELS.tag} mono />
          <SelectField name="kind" label={LABELS.kind} options={KINDS} />
          <TextField name="location" label={LABELS.location} wide hint="Where to find it: roof area, plant room." />
          <SelectField name="shutdownInput" label={LABELS.shutdownInput} options={INPUTS} wide hint="Break to stop: the unit runs only while 24 VAC is on the input. Make to stop: it stops when 24 VAC is applied. See the unit's wiring diagram." />
          <NumberField name="transformerVa" label={LABELS.transformerVa} unit="VA" hint="Rating of the 24 VAC control transformer." />
        </Section>
        <Section title="Airflow and duct" note="Design airflow decides where detectors are required; the duct size gives the air velocity at the detector.">
          <NumberField name="supplyCfm" label={LABELS.supplyCfm} unit="cfm" />
          <NumberField name="returnCfm" label={LABELS.returnCfm} unit="cfm" />
          <SelectField name="ductShape" label={LABELS.ductShape} options={SHAPES} onValue={setShape} wide />
          {shape === 'round' ? (
            <NumberField name="ductDiameterIn" label={LABELS.ductDiameterIn} unit="in" decimals />
          ) : (
            <>
              <NumberField name="ductWidthIn" label={LABELS.ductWidthIn} unit="in" decimals />
              <NumberField name="ductHeightIn" label={LABELS.ductHeightIn} unit="in" decimals />
            </>
          )}
        </Section>
        <Section title="What it serves" note="Read with the site's code basis to tell which detectors are required. Verify with the AHJ.">
          <NumberField name="storeysServed" label={LABELS.storeysServed} />
          <NumberField
            name="storeyReturnDetectors"
            label={LABELS.storeyReturnDetectors}
            hint="Fitted at each storey's return before the common return or riser. Leave blank if not known."
          />
          <CheckField name="sharedPlenum" label={LABELS.sharedPlenum} wide />
          <CheckField name="areaDetection" label={LABELS.areaDetection} wide />
        </Section>
      </RecordForm>
    </div>
  )
}
