// npm start: migrate, seed the demo scale into an empty database, build if the sources changed,
// start the local fakes, then serve. One command from a fresh clone to a working console.
import { spawn, spawnSync } from 'node:child_process'
import { randomBytes } from 'node:crypto'
import { existsSync, readdirSync, readFileSync, statSync, writeFileSync } from 'node:fs'
import { dirname, join } from 'node:path'
import { DEMO_DIRECTORY, startIdentityProvider } from '../mocks/identity-provider'
import { seedFreshDatabase } from '~/.server/seed/fresh'
import { officeToday } from '~/.server/today'

const dbPath = (process.env.DATABASE_PATH ??= 'data/ductkeeper.db')
const port = (process.env.PORT ??= '3000')
// The demo listens on this machine only; HOST=0.0.0.0 (or an address) opens it to the network.
process.env.HOST ??= '127.0.0.1'
// The local demo's public address; sign-in comes back here (open this one, not 127.0.0.1).
process.env.APP_URL ??= `http://localhost:${port}`

// Seeded into a temp file and renamed into place when complete: stopping this during the first seed
// leaves no half-filled database behind, and the next start simply seeds again.
const fresh = seedFreshDatabase(dbPath, 'demo', officeToday(), { log: console.log })
if (fresh.seeded) {
  if (fresh.removedStale.length) console.log(`Removed an interrupted earlier seed: ${fresh.removedStale.join(', ')}`)
  console.log(`Seeded in ${fresh.seconds.toFixed(1)} s:`, fresh.counts)
}

function newestMtime(dir: string): number {
  let newest = 0
  for (const entry of readdirSync(dir, { withFileTypes: true })) {
    const path = join(dir, entry.name)
    newest = Math.max(newest, entry.isDirectory() ? newestMtime(path) : statSync(path).mtimeMs)
  }
  return newest
}

const serverBuild = 'build/server/index.js'
const sources = Math.max(newestMtime('app'), newestMtime('public'), statSync('package.json').mtimeMs)
if (!existsSync(serverBuild) || statSync(serverBuild).mtimeMs < sources) {
  console.log('Building …')
  const build = spawnSync('node_modules/.bin/react-router', ['build'], { stdio: 'inherit' })
  if (build.status !== 0) process.exit(build.status ?? 1)
}

// The server refuses to run in production without a signing secret; for the local demo one is made
// once and kept beside the database.
if (!process.env.SESSION_SECRET) {
  const file = join(dirname(dbPath), '.session-secret')
  if (!existsSync(file)) writeFileSync(file, randomBytes(48).toString('base64url'), { mode: 0o600 })
  process.env.SESSION_SECRET = readFileSync(file, 'utf8').trim()
}

// With no identity provider configured, run the local stand-in so people can sign in.
let idp: Awaited<ReturnType<typeof startIdentityProvider>> | null = null
if (!process.env.OIDC_ISSUER && !process.env.OIDC_AUTHORIZATION_ENDPOINT) {
  // A secret made for this run: the server refuses the well-known demo one in production mode.
  process.env.OIDC_CLIENT_SECRET ??= randomBytes(24).toString('base64url')
  idp = await startIdentityProvider({
    port: Number(process.env.IDP_PORT ?? 4010),
    clientId: process.env.OIDC_CLIENT_ID ?? 'ductkeeper-local',
    clientSecret: process.env.OIDC_CLIENT_SECRET,
    redirectUris: [new URL('/auth/callback', process.env.APP_URL).toString()],
    accounts: DEMO_DIRECTORY,
  })
  process.env.OIDC_ISSUER = idp.issuer
  console.log(`Local stand-in identity provider: ${idp.issuer}`)
}

const server = spawn('node_modules/.bin/react-router-serve', [serverBuild], {
  stdio: 'inherit',
  env: { ...process.env, NODE_ENV: process.env.NODE_ENV ?? 'production', PORT: port },
})
for (const signal of ['SIGINT', 'SIGTERM'] as const) process.on(signal, () => server.kill(signal))
server.on('exit', async (code) => {
  await idp?.close()
  process.exit(code ?? 0)
})
