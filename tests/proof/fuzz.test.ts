import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { builtRoutes, casesFor, describeFindings, runCases, type FuzzRoute } from '#tests/setup/fuzz'
import { startServer } from '#tests/setup/server'
import { seededDb } from '#tests/setup/temp-db'

// The long run of tests/integration/fuzz.test.ts: FUZZ_PER_ROUTE cases for every route (default 100),
// from FUZZ_SEED (default: a new seed each run, printed, so a finding can be run again).
describe('hostile input on every route (long run)', () => {
  let server: Awaited<ReturnType<typeof startServer>>
  let data: ReturnType<typeof seededDb>
  let routes: FuzzRoute[]
  beforeAll(async () => {
    routes = await builtRoutes()
    data = seededDb('small')
    server = await startServer(data.path, { DUCTKEEPER_JOBS: 'off' })
  })
  afterAll(async () => {
    await server?.stop()
    data?.cleanup()
  })

  it('answers every route without a 5xx, a change from a refused request, or raw markup', async () => {
    const seed = Number(process.env.FUZZ_SEED ?? Date.now() % 1_000_000_007)
    const perRoute = Number(process.env.FUZZ_PER_ROUTE ?? 100)
    const started = Date.now()
    const { findings, statuses } = await runCases(casesFor(routes, perRoute, seed), { url: server.url, db: data.db })
    console.info(`fuzz: seed ${seed}, ${routes.length} routes × ${perRoute} cases in ${((Date.now() - started) / 1000).toFixed(0)} s; answers ${JSON.stringify(statuses)}`)
    expect(findings, `seed ${seed}\n${describeFindings(findings)}`).toEqual([])
    expect(server.output()).not.toMatch(/^\s+at /m)
  })
})
