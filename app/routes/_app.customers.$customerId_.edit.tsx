import { data, redirect } from 'react-router'
import { Breadcrumb } from '~/components/breadcrumb'
import { requireUser } from '~/.server/auth'
import { getDb } from '~/.server/db'
import { editableRecord, editFromRequest } from '~/.server/repos/record-edits'
import { pageNotFound, pageRecordId } from '~/.server/repos/record-id'
import { RecordForm, Section, SelectField, TextField, type EditAnswer } from '~/components/forms/record-form'
import type { RouteAccess } from '~/domain/permissions'
import { customerForm, type CustomerForm } from '~/domain/record-forms'
import type { Route } from './+types/_app.customers.$customerId_.edit'

export const handle = { access: { loader: 'edit:records', action: 'edit:records' } satisfies RouteAccess }

export const meta: Route.MetaFunction = ({ data }) => [{ title: data ? `Edit ${data.record.name} · Ductkeeper` : 'Edit customer · Ductkeeper' }]

export async function loader({ request, params }: Route.LoaderArgs) {
  await requireUser(request, 'edit:records')
  const id = pageRecordId(params, 'customerId', 'customer')
  const record = editableRecord(getDb(), 'customer', id)
  if (!record) throw pageNotFound('customer')
  return { id, record, name: String(record.name) }
}

export async function action({ request, params }: Route.ActionArgs) {
  const user = await requireUser(request, 'edit:records')
  const id = pageRecordId(params, 'customerId', 'customer')
  const outcome = await editFromRequest(request, 'customer', user.id, id)
  if (outcome.status === 200) return redirect(`/customers/${id}`)
  return data(outcome, { status: outcome.status })
}

const LABELS: Record<keyof CustomerForm, string> = {
  name: 'Customer name',
  kind: 'Kind of customer',
  contactName: 'Contact name',
  contactEmail: 'Contact e-mail',
  contactPhone: 'Contact telephone',
}

const KINDS = [
  { value: 'restaurant', label: 'Restaurant group' },
  { value: 'retail', label: 'Retail' },
  { value: 'office', label: 'Offices' },
  { value: 'school', label: 'Schools' },
  { value: 'healthcare', label: 'Healthcare' },
]

export default function EditCustomer({ loaderData, actionData }: Route.ComponentProps) {
  const { id, record, name } = loaderData
  return (
    <div className="mx-auto max-w-3xl">
      <Breadcrumb items={[{ to: `/customers/${id}`, name }]} here="Edit" />
      <h1 className="mt-1 mb-4 text-2xl font-semibold">Edit customer</h1>
      <RecordForm key={record.version} record={record} schema={customerForm} answer={actionData as EditAnswer | undefined} labels={LABELS} cancelTo={`/customers/${id}`} what="customer">
        <Section title="Customer">
          <TextField name="name" label={LABELS.name} wide autoComplete="organization" />
          <SelectField name="kind" label={LABELS.kind} options={KINDS} />
        </Section>
        <Section title="Contact" note="The person the office calls about visits and findings.">
          <TextField name="contactName" label={LABELS.contactName} wide autoComplete="name" />
          <TextField name="contactEmail" label={LABELS.contactEmail} mode="email" autoComplete="email" />
          <TextField name="contactPhone" label={LABELS.contactPhone} mode="tel" autoComplete="tel" mono />
        </Section>
      </RecordForm>
    </div>
  )
}
