import { data, redirect, useSearchParams } from 'react-router'
import { requireUser } from '~/.server/auth'
import { getDb } from '~/.server/db'
import { editableRecord, editFromRequest, modelContext } from '~/.server/repos/record-edits'
import { pageNotFound, pageRecordId } from '~/.server/repos/record-id'
import { NumberField, RecordForm, Section, type EditAnswer } from '~/components/forms/record-form'
import type { RouteAccess } from '~/domain/permissions'
import { modelForm, type ModelForm } from '~/domain/record-forms'
import { formatCount } from '~/utils/format'
import type { Route } from './+types/_app.models.$modelId.edit'

export const handle = { access: { loader: 'edit:records', action: 'edit:records' } satisfies RouteAccess }

export const meta: Route.MetaFunction = ({ data }) => [{ title: data ? `Edit ${data.model.name} · Ductkeeper` : 'Edit detector model · Ductkeeper' }]

export async function loader({ request, params }: Route.LoaderArgs) {
  await requireUser(request, 'edit:records')
  const id = pageRecordId(params, 'modelId', 'detector model')
  const db = getDb()
  const record = editableRecord(db, 'model', id)
  const model = modelContext(db, id)
  if (!record || !model) throw pageNotFound('detector model')
  return { record, model }
}

export async function action({ request, params }: Route.ActionArgs) {
  const user = await requireUser(request, 'edit:records')
  const id = pageRecordId(params, 'modelId', 'detector model')
  const outcome = await editFromRequest(request, 'model', user.id, id)
  // A model has no page of its own: the saved form is shown again.
  if (outcome.status === 200) return redirect(`/models/${id}/edit?saved=1`)
  return data(outcome, { status: outcome.status })
}

const LABELS: Record<keyof ModelForm, string> = {
  velocityMinFpm: 'Lowest listed air velocity',
  velocityMaxFpm: 'Highest listed air velocity',
  pressureMinInWc: 'Lowest listed pressure difference',
  pressureMaxInWc: 'Highest listed pressure difference',
  sensitivityLowPctFt: 'Sensitivity range, low end',
  sensitivityHighPctFt: 'Sensitivity range, high end',
}

export default function EditModel({ loaderData, actionData }: Route.ComponentProps) {
  const { record, model } = loaderData
  const [search] = useSearchParams()
  const saved = search.has('saved') && !actionData
  return (
    <div className="mx-auto max-w-3xl">
      <p className="text-sm text-ink-faint">Detector model · fitted on {formatCount(model.detectors)} {model.detectors === 1 ? 'detector' : 'detectors'}</p>
      <h1 className="mt-1 mb-4 text-2xl font-semibold">{model.name}: listed ranges</h1>
      {saved && (
        <p role="status" className="mb-4 rounded-md border border-ok/40 bg-ok-soft px-3 py-2 text-sm text-ok">
          <span aria-hidden="true" className="mr-1.5 font-mono">
            ✓
          </span>
          Saved.
        </p>
      )}
      <RecordForm key={record.version} record={record} schema={modelForm} answer={actionData as EditAnswer | undefined} labels={LABELS} cancelTo="/devices" what="model">
        <Section title="Listed ranges" note="Enter them from the device's listing and instructions. Each detector keeps its own copy of the air ranges, set on its own page.">
          <NumberField name="velocityMinFpm" label={LABELS.velocityMinFpm} unit="ft/min" />
          <NumberField name="velocityMaxFpm" label={LABELS.velocityMaxFpm} unit="ft/min" />
          <NumberField name="pressureMinInWc" label={LABELS.pressureMinInWc} unit="in. w.c." decimals />
          <NumberField name="pressureMaxInWc" label={LABELS.pressureMaxInWc} unit="in. w.c." decimals />
          <NumberField name="sensitivityLowPctFt" label={LABELS.sensitivityLowPctFt} unit="%/ft" decimals hint="Obscuration. Leave both blank until known." />
          <NumberField name="sensitivityHighPctFt" label={LABELS.sensitivityHighPctFt} unit="%/ft" decimals />
        </Section>
      </RecordForm>
    </div>
  )
}
