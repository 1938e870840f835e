import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { seededDb } from '#tests/setup/temp-db'
import { startServer } from '#tests/setup/server'

describe('built server', () => {
  let server: Awaited<ReturnType<typeof startServer>>
  let data: ReturnType<typeof seededDb>
  beforeAll(async () => {
    data = seededDb('small')
    server = await startServer(data.path)
  })
  afterAll(async () => {
    await server?.stop()
    data?.cleanup()
  })

  it('answers /healthz once the database is open', async () => {
    const res = await fetch(`${server.url}/healthz`)
    expect(res.status).toBe(200)
    expect(await res.json()).toEqual({ ok: true })
  })
})
