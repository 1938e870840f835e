// npm run bench [-- --scale small|demo] : loopback-only measurements, bounded in count and time.
// Reports the trade engine in-process and the JSON API through the built server.
import { parseArgs } from 'node:util'
import { createToken } from '~/.server/repos/tokens'
import { diagnose, type Arrangement } from '~/domain/loop'
import { startServer } from '#tests/setup/server'
import { seededDb } from '#tests/setup/temp-db'

const { values } = parseArgs({ options: { scale: { type: 'string', default: 'small' }, requests: { type: 'string', default: '2000' } } })
const scale = values.scale === 'demo' ? 'demo' : 'small'
const requests = Math.min(20_000, Math.max(100, Number(values.requests)))

function stats(ms: number[]) {
  const s = [...ms].sort((a, b) => a - b)
  const at = (p: number) => s[Math.min(s.length - 1, Math.floor(p * s.length))]
  return { n: s.length, mean: (s.reduce((a, b) => a + b, 0) / s.length).toFixed(3), p50: at(0.5).toFixed(3), p95: at(0.95).toFixed(3), p99: at(0.99).toFixed(3), max: s[s.length - 1].toFixed(3) }
}

const arrangement: Arrangement = {
  eolOhms: 15000,
  eolPlacement: 'through-supervisory',
  alarmTerminal: 'NO',
  supervisoryTerminal: 'NO',
  conductor: { awg: 18, stranded: true, oneWayFeet: 250 },
  measuredAt: 'panel',
}
const readings = { normal: 4.1, alarm: 15010, trouble: 4.0, unpowered: 4.0 } as const

// In process: the engine alone.
const engine: number[] = []
for (let i = 0; i < 20_000; i++) {
  const t = performance.now()
  diagnose(arrangement, readings)
  engine.push(performance.now() - t)
}
console.log('diagnose() in process, ms:', stats(engine))

const data = seededDb(scale)
const server = await startServer(data.path)
try {
  const { token } = createToken(data.db, { userId: 4, name: 'bench', expiresAt: new Date(Date.now() + 3_600_000), actorId: null })
  const body = JSON.stringify({ arrangement, readings })
  const api: number[] = []
  const deadline = Date.now() + 60_000
  for (let i = 0; i < requests && Date.now() < deadline; i++) {
    const t = performance.now()
    const res = await fetch(`${server.url}/api/diagnose`, { method: 'POST', headers: { Authorization: `Bearer ${token}`, 'Content-Type': 'application/json' }, body })
    await res.json()
    if (res.status !== 200) throw new Error(`status ${res.status}`)
    api.push(performance.now() - t)
  }
  const floor: number[] = []
  for (let i = 0; i < 500; i++) {
    const t = performance.now()
    await (await fetch(`${server.url}/healthz`)).json()
    floor.push(performance.now() - t)
  }
  console.log('GET /healthz (the server floor: HTTP, logging, router), ms:', stats(floor.slice(50)))
  console.log('POST /api/diagnose over loopback (auth + zod + engine + JSON), ms:', stats(api.slice(50)))
} finally {
  await server.stop()
  data.cleanup()
}
