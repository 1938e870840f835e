import { spawn } from 'node:child_process'
import { createServer } from 'node:net'
import { DEMO_DIRECTORY, startIdentityProvider } from '../../mocks/identity-provider'
import { TEST_TODAY } from './temp-db'

export const TEST_SESSION_SECRET = 'test-session-secret-0123456789abcdef-0123456789'
export const TEST_CLIENT = { id: 'ductkeeper-test', secret: 'test-client-secret' }

export async function freePort(): Promise<number> {
  return new Promise((resolve, reject) => {
    const srv = createServer()
    srv.unref()
    srv.on('error', reject)
    srv.listen(0, '127.0.0.1', () => {
      const { port } = srv.address() as { port: number }
      srv.close(() => resolve(port))
    })
  })
}

/**
 * Starts the built server on a loopback port against the given database, with the stand-in
 * identity provider beside it; resolves once /healthz answers.
 */
export async function startServer(databasePath: string, extraEnv: Record<string, string> = {}) {
  // A port found free can be taken by another suite's server before this one listens on it: try again
  // on another port rather than fail the suite.
  for (let attempt = 1; ; attempt++) {
    try {
      return await startOnce(databasePath, extraEnv)
    } catch (error) {
      if (attempt >= 3 || !String(error).includes('EADDRINUSE')) throw error
    }
  }
}

async function startOnce(databasePath: string, extraEnv: Record<string, string>) {
  const port = await freePort()
  const url = `http://127.0.0.1:${port}`
  const idp = await startIdentityProvider({
    port: 0,
    clientId: TEST_CLIENT.id,
    clientSecret: TEST_CLIENT.secret,
    redirectUris: [`${url}/auth/callback`],
    accounts: DEMO_DIRECTORY,
  })
  const child = spawn('node_modules/.bin/react-router-serve', ['build/server/index.js'], {
    env: {
      ...process.env,
      NODE_ENV: 'production',
      DATABASE_PATH: databasePath,
      PORT: String(port),
      HOST: '127.0.0.1',
      SESSION_SECRET: TEST_SESSION_SECRET,
      OFFICE_TODAY: TEST_TODAY,
      APP_URL: url,
      OIDC_ISSUER: idp.issuer,
      OIDC_CLIENT_ID: TEST_CLIENT.id,
      OIDC_CLIENT_SECRET: TEST_CLIENT.secret,
      ...extraEnv,
    },
    stdio: ['ignore', 'pipe', 'pipe'],
  })
  let output = ''
  child.stdout.on('data', (d) => (output += d))
  child.stderr.on('data', (d) => (output += d))
  const deadline = Date.now() + 20_000
  for (;;) {
    if (child.exitCode !== null) {
      await idp.close()
      throw new Error(`server exited early:\n${output}`)
    }
    try {
      const res = await fetch(`${url}/healthz`)
      if (res.ok) break
    } catch {
      // not listening yet
    }
    if (Date.now() > deadline) throw new Error(`server did not answer /healthz in 20 s:\n${output}`)
    await new Promise((r) => setTimeout(r, 100))
  }
  return {
    url,
    issuer: idp.issuer,
    output: () => output,
    pid: child.pid as number,
    stop: async () => {
      await new Promise<void>((resolve) => {
        if (child.exitCode !== null || child.signalCode !== null) return resolve()
        child.once('exit', () => resolve())
        child.kill('SIGTERM')
      })
      await idp.close()
    },
  }
}
