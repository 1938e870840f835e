import { describe, expect, it } from 'vitest'
import { bulkReschedule, csvImport, killDuring, visitCompletion } from '#tests/setup/faults'

// Each write is first left to finish (its time, T), then killed at points across T and a little
// past it. Wherever the kill lands, the change is wholly there or wholly absent, db-check finds
// nothing, and the server starts again healthy.
describe.each([bulkReschedule(1500), csvImport, visitCompletion])('SIGKILL during a $name', (scenario) => {
  it('is wholly before or wholly after, wherever the kill lands', async () => {
    const whole = await killDuring(scenario, null)
    expect(whole.answered).toBe(200)
    expect(whole.state).toBe('after')
    expect(whole.disagreements).toEqual([])
    const seen: string[] = []
    for (const fraction of [0.05, 0.25, 0.5, 0.75, 0.95, 1.5]) {
      const r = await killDuring(scenario, Math.round(whole.ms * fraction))
      seen.push(`${fraction}: ${r.state}${r.answered ? ` (answered ${r.answered})` : ''}`)
      expect(r.state, seen.join('; ')).not.toBe('partial')
      expect(r.disagreements).toEqual([])
      expect(r.health).toBe(200)
    }
    console.info(`${scenario.name}: T = ${whole.ms.toFixed(0)} ms; kills at ${seen.join(', ')}`)
  })
})
