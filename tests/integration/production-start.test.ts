import { spawn } from 'node:child_process'
import { existsSync, mkdtempSync, rmSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import { afterAll, describe, expect, it } from 'vitest'
import { freePort, TEST_SESSION_SECRET } from '#tests/setup/server'

const dir = mkdtempSync(join(tmpdir(), 'dk-prod-'))
afterAll(() => rmSync(dir, { recursive: true, force: true }))

/** Runs the built server in production with the given environment; resolves with its exit and output. */
async function serve(env: Record<string, string>): Promise<{ code: number | null; output: string }> {
  const port = await freePort()
  const base: Record<string, string> = {}
  for (const [k, v] of Object.entries(process.env)) if (v !== undefined && !k.startsWith('OIDC_') && k !== 'APP_URL' && k !== 'DATABASE_PATH') base[k] = v
  const child = spawn('node_modules/.bin/react-router-serve', ['build/server/index.js'], {
    env: {
      ...base,
      NODE_ENV: 'production',
      PORT: String(port),
      HOST: '127.0.0.1',
      SESSION_SECRET: TEST_SESSION_SECRET,
      APP_URL: 'https://ductkeeper.example.test',
      DATABASE_PATH: join(dir, 'ductkeeper.db'),
      OIDC_ISSUER: 'https://id.example.test',
      OIDC_CLIENT_ID: 'ductkeeper',
      OIDC_CLIENT_SECRET: 'a-real-secret-from-the-provider',
      DUCTKEEPER_JOBS: 'off',
      ...env,
    },
    stdio: ['ignore', 'pipe', 'pipe'],
  })
  let output = ''
  child.stdout.on('data', (d) => (output += d))
  child.stderr.on('data', (d) => (output += d))
  const timer = setTimeout(() => child.kill('SIGTERM'), 15_000)
  const code = await new Promise<number | null>((resolve) => child.once('exit', (c) => resolve(c)))
  clearTimeout(timer)
  return { code, output }
}

describe('npm run serve in production', () => {
  it('refuses the local demo client secret', async () => {
    const { code, output } = await serve({ OIDC_CLIENT_SECRET: 'local-secret-not-for-production' })
    expect(code).not.toBe(0)
    expect(output).toContain('Ductkeeper cannot start')
    expect(output).toContain('OIDC_CLIENT_SECRET: set the client secret registered with your identity provider')
  })

  it('refuses to start with no identity provider', async () => {
    const { code, output } = await serve({ OIDC_ISSUER: '' })
    expect(code).not.toBe(0)
    expect(output).toContain('OIDC_ISSUER (or all three OIDC_*_ENDPOINT variables) is required in production')
  })

  it('refuses a missing data folder instead of making an empty database', async () => {
    const missing = join(dir, 'not-mounted', 'ductkeeper.db')
    const { code, output } = await serve({ DATABASE_PATH: missing })
    expect(code).not.toBe(0)
    expect(output).toMatch(/DATABASE_PATH: the folder .*not-mounted does not exist/)
    expect(existsSync(join(dir, 'not-mounted'))).toBe(false)
  })
})
