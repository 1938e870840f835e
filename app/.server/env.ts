import { z } from 'zod'

const schema = z.object({
  NODE_ENV: z.enum(['development', 'production', 'test']).default('development'),
  DATABASE_PATH: z.string().min(1).default('data/ductkeeper.db'),
  PORT: z.coerce.number().int().positive().default(3000),
  APP_URL: z.string().url().optional(),
})

export type Env = z.infer<typeof schema>

/** Parsed once at boot; a bad value stops the server with the zod message. */
export const env: Readonly<Env> = Object.freeze(schema.parse(process.env))
