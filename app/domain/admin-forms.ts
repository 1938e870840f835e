import { z } from 'zod'
import { ROLE_KEYS } from './permissions'

const email = z.string().trim().toLowerCase().email('Enter a valid e-mail address')
const id = z.coerce.number().int().positive()

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
