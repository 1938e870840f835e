// npm run token -- --email <email> [--name N] [--days 90]
// Creates an API token for an existing, active user from the server's shell and prints it once.
import { parseArgs } from 'node:util'
import { z } from 'zod'
import { createDb } from '~/.server/db'
import { createToken } from '~/.server/repos/tokens'

const { values } = parseArgs({
  options: { email: { type: 'string' }, name: { type: 'string', default: 'Shell token' }, days: { type: 'string', default: '90' } },
})
const opts = z
  .object({ email: z.string().trim().toLowerCase().email(), name: z.string().min(2).max(80), days: z.coerce.number().int().min(1).max(366) })
  .safeParse(values)
if (!opts.success) {
  console.error('Usage: npm run token -- --email <email> [--name N] [--days 1-366]')
  for (const i of opts.error.issues) console.error(`  ${i.path.join('.')}: ${i.message}`)
  process.exit(2)
}
const db = createDb(process.env.DATABASE_PATH ?? 'data/ductkeeper.db')
const user = db.$client.prepare('select id, active from users where lower(email) = ?').get(opts.data.email) as { id: number; active: number } | undefined
if (!user || !user.active) {
  console.error(`No active user ${opts.data.email}; invite them first.`)
  process.exit(1)
}
const { token } = createToken(db, { userId: user.id, name: opts.data.name, expiresAt: new Date(Date.now() + opts.data.days * 86_400_000), actorId: null })
db.$client.close()
// Only the token on stdout, so scripts can capture it.
console.log(token)
