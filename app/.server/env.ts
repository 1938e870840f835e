import { existsSync } from 'node:fs'
import { dirname, resolve } from 'node:path'
import { z } from 'zod'

/** The local stand-in provider's secret: fine on a laptop, refused in production. */
const DEMO_CLIENT_SECRET = 'local-secret-not-for-production'

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
    /** The provider's end_session_endpoint, when not found by discovery; sign-out ends its session there. */
    OIDC_END_SESSION_ENDPOINT: optionalUrl,
    OIDC_CLIENT_ID: z.string().default('ductkeeper-local'),
    OIDC_CLIENT_SECRET: z.string().default(DEMO_CLIENT_SECRET),
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
    if (env.NODE_ENV !== 'production') return
    // Production signs people in through the company's provider only, never the local stand-in's.
    if (!env.OIDC_ISSUER && !(env.OIDC_AUTHORIZATION_ENDPOINT && env.OIDC_TOKEN_ENDPOINT && env.OIDC_USERINFO_ENDPOINT)) {
      ctx.addIssue({ code: 'custom', path: ['OIDC_ISSUER'], message: 'OIDC_ISSUER (or all three OIDC_*_ENDPOINT variables) is required in production' })
    }
    if (env.OIDC_CLIENT_SECRET === DEMO_CLIENT_SECRET || !env.OIDC_CLIENT_SECRET.trim()) {
      ctx.addIssue({ code: 'custom', path: ['OIDC_CLIENT_SECRET'], message: 'set the client secret registered with your identity provider; the local demo secret is refused in production' })
    }
    // A missing folder is a mistyped path or an unmounted volume: starting would make a new, empty
    // database there and look like every record was lost.
    if (env.DATABASE_PATH !== ':memory:' && !existsSync(dirname(resolve(env.DATABASE_PATH)))) {
      ctx.addIssue({ code: 'custom', path: ['DATABASE_PATH'], message: `the folder ${dirname(resolve(env.DATABASE_PATH))} does not exist; create it (and restore or migrate the database) first` })
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
