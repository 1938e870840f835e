import { z } from 'zod'

const optionalUrl = z.string().url().optional()

const schema = z
  .object({
    NODE_ENV: z.enum(['development', 'production', 'test']).default('development'),
    DATABASE_PATH: z.string().min(1).default('data/ductkeeper.db'),
    /** Where uploaded photos and documents are kept; unset, a folder `attachments` beside the database file. */
    ATTACHMENTS_DIR: z.string().min(1).optional(),
    PORT: z.coerce.number().int().positive().default(3000),
    /** The public origin, e.g. https://ductkeeper.example.com; sets Secure cookies and the origin check. */
    APP_URL: optionalUrl,
    SESSION_SECRET: z.string().optional(),
    SESSION_MAX_AGE_HOURS: z.coerce.number().positive().default(12),
    SESSION_IDLE_MINUTES: z.coerce.number().positive().default(60),
    OIDC_ISSUER: optionalUrl,
    OIDC_AUTHORIZATION_ENDPOINT: optionalUrl,
    OIDC_TOKEN_ENDPOINT: optionalUrl,
    OIDC_USERINFO_ENDPOINT: optionalUrl,
    OIDC_CLIENT_ID: z.string().default('ductkeeper-local'),
    OIDC_CLIENT_SECRET: z.string().default('local-secret-not-for-production'),
    OIDC_REDIRECT_URI: optionalUrl,
    /** The contractor's name as printed on inspection records. */
    COMPANY_NAME: z.string().trim().min(1).max(120).default('Brightwater Mechanical'),
  })
  .superRefine((env, ctx) => {
    // Production refuses to start without a real signing secret.
    if (env.NODE_ENV === 'production' && (!env.SESSION_SECRET || env.SESSION_SECRET.length < 32)) {
      ctx.addIssue({ code: 'custom', path: ['SESSION_SECRET'], message: 'SESSION_SECRET of at least 32 characters is required in production' })
    }
    // The sign-in redirect must never be taken from a request's Host header.
    if (env.NODE_ENV === 'production' && !env.APP_URL && !env.OIDC_REDIRECT_URI) {
      ctx.addIssue({ code: 'custom', path: ['APP_URL'], message: 'APP_URL (or OIDC_REDIRECT_URI) is required in production' })
    }
  })

export type Env = z.infer<typeof schema>

function parse(): Readonly<Env> {
  const result = schema.safeParse(process.env)
  if (!result.success) {
    const lines = result.error.issues.map((i) => `  ${i.path.join('.')}: ${i.message}`).join('\n')
    throw new Error(`Ductkeeper cannot start; fix the environment:\n${lines}`)
  }
  return Object.freeze(result.data)
}

/** Parsed once at boot; a bad value stops the server with a plain message. */
export const env: Readonly<Env> = parse()

export const sessionSecret = env.SESSION_SECRET ?? 'development-only-secret-change-me-please-0000'
export const secureCookies = env.APP_URL?.startsWith('https://') ?? false
