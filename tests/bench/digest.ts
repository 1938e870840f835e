// npx tsx tests/bench/digest.ts --db <file> [--today YYYY-MM-DD] [--runs 5]
// Times the weekly digest for everyone who receives it: the fleet counted once, then each person's sum,
// then each message rendered to HTML and text; in wall and CPU time (the CPU figure holds steadier on a
// busy machine). Works on a copy of the file, so the original is never written.
import { copyFileSync, mkdtempSync, rmSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import { parseArgs } from 'node:util'
import { createDb } from '~/.server/db'
import { derivedDay } from '~/.server/derivation'
import { digestFigures, digestRecipients, fleetFigures } from '~/.server/email/digest'
import { digestMessage } from '~/.server/email/digest-message'

const { values } = parseArgs({ options: { db: { type: 'string' }, today: { type: 'string' }, runs: { type: 'string', default: '5' } } })
if (!values.db) throw new Error('--db <file> is required (e.g. a stress-scale database)')
const dir = mkdtempSync(join(tmpdir(), 'ductkeeper-bench-'))
const path = join(dir, 'bench.db')
copyFileSync(values.db, path)
const db = createDb(path)
const today = values.today ?? derivedDay(db) ?? '2026-06-15'
const people = digestRecipients(db)
const cpuMs = () => {
  const u = process.cpuUsage()
  return (u.user + u.system) / 1000
}
const median = (xs: number[]) => [...xs].sort((a, b) => a - b)[Math.floor(xs.length / 2)]
console.log(`${people.length} recipients, office day ${today}`)
const wall: number[] = []
const cpu: number[] = []
for (let i = 0; i < Number(values.runs); i++) {
  const w = performance.now()
  const c = cpuMs()
  const fleet = fleetFigures(db, today)
  for (const p of people) digestFigures(db, { today, customerIds: p.customerIds.length ? p.customerIds : null, fleet })
  wall.push(performance.now() - w)
  cpu.push(cpuMs() - c)
}
console.log(`every recipient's figures: median ${median(wall).toFixed(0)} ms wall, ${median(cpu).toFixed(0)} ms CPU (first run ${wall[0].toFixed(0)} ms wall)`)
const w = performance.now()
const c = cpuMs()
const fleet = fleetFigures(db, today)
for (const p of people) await digestMessage(db, p, today, fleet)
console.log(`every recipient's digest built and rendered: ${(performance.now() - w).toFixed(0)} ms wall, ${(cpuMs() - c).toFixed(0)} ms CPU`)
db.$client.close()
rmSync(dir, { recursive: true, force: true })
