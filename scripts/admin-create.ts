// npm run admin:create -- --email <email> --name "<full name>"
// Provisions an administrator from the server's shell: the first one of a real deployment, who
// then invites everyone else under Users. They sign in through the identity provider as usual.
import { eq, sql } from 'drizzle-orm'
import { parseArgs } from 'node:util'
import { z } from 'zod'
import { writeAudit } from '~/.server/audit'
import { createDb, writeTx } from '~/.server/db'
import { roles, users } from '~/.server/schema'
import { ROLES } from '~/.server/seed/names'

const { values } = parseArgs({ options: { email: { type: 'string' }, name: { type: 'string' } } })
const opts = z
  .object({
    email: z.string({ message: 'required' }).trim().toLowerCase().email('not an e-mail address'),
    name: z.string({ message: 'required' }).trim().min(2, 'at least 2 characters').max(120, 'at most 120 characters'),
  })
  .safeParse(values)
if (!opts.success) {
  console.error('Usage: npm run admin:create -- --email <email> --name "<full name>"')
  for (const i of opts.error.issues) console.error(`  --${i.path.join('.')}: ${i.message}`)
  process.exit(2)
}
const { email, name } = opts.data
const db = createDb(process.env.DATABASE_PATH ?? 'data/ductkeeper.db')
const id = writeTx(db, () => {
  // A deployment's database starts migrated but unseeded: the role list every user points at comes first.
  db.insert(roles).values(ROLES.map((r) => ({ key: r.key, label: r.label, description: r.description }))).onConflictDoNothing().run()
  // Addresses compare without case; the builder has no lower().
  if (db.select({ id: users.id }).from(users).where(eq(sql`lower(${users.email})`, email)).get()) return null
  const row = db.insert(users).values({ email, name, role: 'admin', active: true }).returning({ id: users.id }).get()
  // No person is signed in at the shell: the entry has no actor and says where it came from.
  writeAudit(db, { actorId: null, action: 'user.invite', entity: 'user', entityId: row.id, after: { email, name, role: 'admin', via: 'shell' } })
  return row.id
})
db.$client.close()
if (id === null) {
  console.error(`${email} already has an account; change its role under Users, or choose another address.`)
  process.exit(1)
}
console.log(`Administrator ${name} <${email}> created (user ${id}). They sign in through the identity provider.`)
