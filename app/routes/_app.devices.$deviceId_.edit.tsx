import { data, Link, redirect } from 'react-router'
import { Breadcrumb } from '~/components/breadcrumb'
import { requireUser } from '~/.server/auth'
import { getDb } from '~/.server/db'
import { detectorContext, editableRecord, editFromRequest, modelChoices } from '~/.server/repos/record-edits'
import { pageNotFound, pageRecordId } from '~/.server/repos/record-id'
import { CheckField, NumberField, RecordForm, Section, SelectField, TextField, type EditAnswer } from '~/components/forms/record-form'
import { AWG_SIZES } from '~/domain/conductors'
import type { RouteAccess } from '~/domain/permissions'
import { detectorCautions, detectorForm, type DetectorForm } from '~/domain/record-forms'
import type { Route } from './+types/_app.devices.$deviceId_.edit'

export const handle = { access: { loader: 'edit:records', action: 'edit:records' } satisfies RouteAccess }

export const meta: Route.MetaFunction = ({ data }) => [{ title: data ? `Edit ${data.detector.tag} · ${data.detector.site} · Ductkeeper` : 'Edit detector · Ductkeeper' }]

export async function loader({ request, params }: Route.LoaderArgs) {
  await requireUser(request, 'edit:records')
  const id = pageRecordId(params, 'deviceId', 'detector')
  const db = getDb()
  const record = editableRecord(db, 'detector', id)
  const detector = detectorContext(db, id)
  if (!record || !detector) throw pageNotFound('detector')
  return { record, detector, models: modelChoices(db) }
}

export async function action({ request, params }: Route.ActionArgs) {
  const user = await requireUser(request, 'edit:records')
  const id = pageRecordId(params, 'deviceId', 'detector')
  const outcome = await editFromRequest(request, 'detector', user.id, id)
  if (outcome.status === 200) return redirect(`/devices/${id}`)
  return data(outcome, { status: outcome.status })
}

const LABELS: Record<keyof DetectorForm, string> = {
  tag: 'Detector tag',
  serial: 'Serial number',
  modelId: 'Model',
  position: 'Position',
  headsFitted: 'Sensing heads fitted',
  housing: 'Housing',
  environment: 'Environment',
  delaySeconds: 'Reporting delay set on the module',
  delayObservedOn: 'Delay seen on',
  eolOhms: 'End-of-line (EOL) resistor',
  eolTolerancePct: 'EOL resistor tolerance',
  alarmThresholdOhms: 'Panel input alarm threshold',
  eolPlacement: 'EOL resistor placement',
  alarmTerminal: 'Alarm contact terminal',
  supervisoryTerminal: 'Supervisory contact terminal',
  conductorAwg: 'Conductor size',
  conductorStranded: 'Stranded conductor',
  runFeet: 'Run to the panel, one way',
  testStation: 'Remote test station',
  testStationFeet: 'Test station distance',
  velocityMinFpm: 'Lowest listed air velocity',
  velocityMaxFpm: 'Highest listed air velocity',
  pressureMinInWc: 'Lowest listed pressure difference',
  pressureMaxInWc: 'Highest listed pressure difference',
  cleaningIntervalDays: 'Cleaning interval',
}

const opts = (pairs: Array<[string, string]>) => pairs.map(([value, label]) => ({ value, label }))
const POSITIONS = opts([
  ['supply', 'Supply duct'],
  ['return', 'Return duct'],
])
const HOUSINGS = opts([
  ['standard', 'Standard'],
  ['nema4', 'Water-resistant (NEMA 4)'],
  ['nema4x', 'Washdown, corrosion-resistant (NEMA 4X)'],
])
const ENVIRONMENTS = opts([
  ['clean', 'Clean air (offices, shops)'],
  ['dusty', 'Dusty'],
  ['kitchen', 'Kitchen'],
  ['humid', 'Humid or wet'],
])
const PLACEMENTS = opts([
  ['through-supervisory', 'Through the supervisory contact'],
  ['across-pair', 'Across the pair'],
])
const TERMINALS = opts([
  ['NO', 'NO'],
  ['NC', 'NC'],
])
const STATIONS = opts([
  ['none', 'None fitted'],
  ['key', 'Key-operated'],
  ['magnet', 'Magnet-operated'],
])
const HEADS = opts([
  ['1', '1'],
  ['2', '2'],
])

const seconds = (s: number) => (s === 0 ? 'report at once' : s % 60 === 0 ? `${s} s (${s / 60} min)` : `${s} s`)

export default function EditDetector({ loaderData, actionData }: Route.ComponentProps) {
  const { record, detector: d, models } = loaderData
  return (
    <div className="mx-auto max-w-3xl">
      <Breadcrumb
        items={[
          { to: `/sites/${d.siteId}`, name: d.site },
          { to: `/units/${d.unitId}`, name: d.unit, mono: true },
          { to: `/devices/${d.id}`, name: d.tag, mono: true },
        ]}
        here="Edit"
      />
      <h1 className="mt-1 mb-4 text-2xl font-semibold">Edit detector</h1>
      <RecordForm key={record.version} record={record} schema={detectorForm} cautions={detectorCautions} answer={actionData as EditAnswer | undefined} labels={LABELS} cancelTo={`/devices/${d.id}`} what="detector">
        <Section title="Detector">
          <TextField name="tag" label={LABELS.tag} mono />
          <TextField name="serial" label={LABELS.serial} mono />
          <SelectField
            name="modelId"
            label={LABELS.modelId}
            options={models.map((m) => ({ value: m.id, label: m.name }))}
            hint="The listed ranges below are this detector's own copy."
            wide
          />
          <SelectField name="position" label={LABELS.position} options={POSITIONS} />
          <SelectField name="headsFitted" label={LABELS.headsFitted} options={HEADS} />
          <SelectField name="housing" label={LABELS.housing} options={HOUSINGS} />
          <SelectField name="environment" label={LABELS.environment} options={ENVIRONMENTS} />
          <NumberField name="cleaningIntervalDays" label={LABELS.cleaningIntervalDays} unit="days" hint="Leave blank for the interval its environment calls for." />
        </Section>
        <Section title="Reporting delay" note={`The site's agreed policy: ${seconds(d.delayPolicySeconds)}. The delay is set on the module's switches, per the device's instructions.`}>
          <NumberField name="delaySeconds" label={LABELS.delaySeconds} unit="s" hint="Leave blank if nobody has recorded it." />
          <TextField name="delayObservedOn" label={LABELS.delayObservedOn} mode="date" hint="The day someone read the switches." />
        </Section>
        <Section
          title="Fire alarm loop, as installed"
          note="Record what is there. The panel and the alarm wiring belong to the fire alarm contractor: HVAC staff do not alter them."
        >
          <NumberField name="eolOhms" label={LABELS.eolOhms} unit="Ω" hint="As marked on the resistor, such as 15000." />
          <NumberField name="eolTolerancePct" label={LABELS.eolTolerancePct} unit="%" decimals hint="As marked on the resistor (a gold band is 5 %). Blank means 5 %." />
          <NumberField
            name="alarmThresholdOhms"
            label={LABELS.alarmThresholdOhms}
            unit="Ω"
            hint="From the panel's documentation, via the fire alarm contractor. Blank means 100 Ω, a common figure."
          />
          <SelectField name="eolPlacement" label={LABELS.eolPlacement} options={PLACEMENTS} hint="In series through the supervisory contact, or straight across the pair." />
          <SelectField name="alarmTerminal" label={LABELS.alarmTerminal} options={TERMINALS} hint="Labelled as on the module." />
          <SelectField name="supervisoryTerminal" label={LABELS.supervisoryTerminal} options={TERMINALS} hint="Labelled as on the module." />
          <SelectField name="conductorAwg" label={LABELS.conductorAwg} options={AWG_SIZES.map((a) => ({ value: a, label: `${a} AWG` }))} />
          <NumberField name="runFeet" label={LABELS.runFeet} unit="ft" />
          <CheckField name="conductorStranded" label={LABELS.conductorStranded} wide />
        </Section>
        <Section title="Test station">
          <SelectField name="testStation" label={LABELS.testStation} options={STATIONS} />
          <NumberField name="testStationFeet" label={LABELS.testStationFeet} unit="ft" hint="Wire run from the detector to the station." />
        </Section>
        <Section title="Listed ranges" note="From the device's listing and instructions.">
          <NumberField name="velocityMinFpm" label={LABELS.velocityMinFpm} unit="ft/min" />
          <NumberField name="velocityMaxFpm" label={LABELS.velocityMaxFpm} unit="ft/min" />
          <NumberField name="pressureMinInWc" label={LABELS.pressureMinInWc} unit="in. w.c." decimals />
          <NumberField name="pressureMaxInWc" label={LABELS.pressureMaxInWc} unit="in. w.c." decimals />
        </Section>
      </RecordForm>
      <p className="mt-4 text-sm text-ink-soft">
        <Link to={`/models/${d.modelId}/edit`} className="underline decoration-line-strong underline-offset-2 hover:text-ink">
          Edit the model&apos;s listed ranges
        </Link>
      </p>
    </div>
  )
}
