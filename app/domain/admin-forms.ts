import { z } from 'zod'
import { ROLE_KEYS } from './permissions'
import { CAPACITY_UNITS } from './vocabulary'

const email = z.string().trim().toLowerCase().email('Enter a valid e-mail address')
const id = z.coerce.number().int().positive()

// An ISO 3166-2 subdivision: country, hyphen, one to three letters or digits (US-OR, CA-BC, DE-BY).
const REGION = /^[A-Z]{2}-[A-Z0-9]{1,3}$/

/** 'us-or, US-WA' → ['US-OR', 'US-WA']: typed as a list, checked code by code, each once. */
export const regionList = z
  .string()
  .max(400, 'Too many regions')
  .transform((s) => [...new Set(s.split(/[\s,;]+/).map((r) => r.trim().toUpperCase()).filter(Boolean))])
  .superRefine((list, ctx) => {
    const bad = list.filter((r) => !REGION.test(r))
    if (bad.length) ctx.addIssue({ code: 'custom', message: `${bad.join(', ')} ${bad.length === 1 ? 'is not a region code' : 'are not region codes'}: use ISO 3166-2, like US-OR` })
    if (list.length > 30) ctx.addIssue({ code: 'custom', message: 'At most 30 regions' })
  })

const workload = {
  regions: regionList,
  // An empty box means "not set": the planner then does not cap the technician's day.
  dailyCapacity: z
    .string()
    .trim()
    .transform((s) => (s === '' ? null : Number(s)))
    .pipe(z.number({ message: 'Enter a whole number' }).int('Enter a whole number').min(1, 'At least 1').max(500, 'At most 500').nullable()),
  capacityUnit: z.enum(CAPACITY_UNITS, { message: 'Choose detectors or visits' }),
}

export const userAction = z.discriminatedUnion('intent', [
  z.object({
    intent: z.literal('invite'),
    email,
    name: z.string().trim().min(2, 'Enter the person’s name').max(120),
    role: z.enum(ROLE_KEYS, { message: 'Choose a role' }),
  }),
  z.object({ intent: z.literal('change-role'), userId: id, role: z.enum(ROLE_KEYS, { message: 'Choose a role' }) }),
  z.object({ intent: z.literal('deactivate'), userId: id }),
  z.object({ intent: z.literal('reactivate'), userId: id }),
  z.object({ intent: z.literal('workload'), userId: id, ...workload }),
])

export const tokenAction = z.discriminatedUnion('intent', [
  z.object({
    intent: z.literal('create'),
    userId: id,
    name: z.string().trim().min(2, 'Name the token after what will use it').max(80),
    expiresInDays: z.coerce.number().int().min(1, 'At least 1 day').max(366, 'At most 366 days'),
  }),
  z.object({ intent: z.literal('revoke'), tokenId: id }),
])

/** Field → first message, for showing next to inputs. */
export function fieldErrors(error: z.ZodError): Record<string, string> {
  const out: Record<string, string> = {}
  for (const issue of error.issues) {
    const key = String(issue.path[0] ?? 'form')
    out[key] ??= issue.message
  }
  return out
}
