// npm run db:seed -- --scale small|demo|stress [--today YYYY-MM-DD] [--force]
import { parseArgs } from 'node:util'
import { z } from 'zod'
import { seedFreshDatabase } from '~/.server/seed/fresh'
import type { Scale } from '~/.server/seed/generate'
import { officeToday } from '~/.server/today'
import { isIsoDate } from '~/domain/dates'

const { values } = parseArgs({
  options: { scale: { type: 'string', default: 'demo' }, today: { type: 'string' }, force: { type: 'boolean', default: false } },
})
const opts = z
  .object({
    scale: z.enum(['small', 'demo', 'stress']),
    today: z.string().refine(isIsoDate, 'today must be YYYY-MM-DD').optional(),
    force: z.boolean(),
  })
  .parse(values)

const path = process.env.DATABASE_PATH ?? 'data/ductkeeper.db'
// All or nothing: written beside the target and renamed over it when complete (see seedFreshDatabase).
const result = seedFreshDatabase(path, opts.scale as Scale, opts.today ?? officeToday(), { replace: opts.force })
if (!result.seeded) {
  console.error(`${path} already holds data; pass --force to replace it with freshly seeded data.`)
  process.exit(1)
}
console.log(`Seeded ${opts.scale} into ${path} in ${result.seconds.toFixed(1)} s:`, result.counts)
