import { describe, expect, it } from 'vitest'
import { bulkReschedule, killDuring } from '#tests/setup/faults'

// The short case; `npm run test:proof` kills each of three writes at several points.
describe('a server killed in the middle of a bulk change', () => {
  it('leaves the change wholly before or wholly after, the database consistent, and starts again healthy', async () => {
    const r = await killDuring(bulkReschedule(400), 25)
    expect(r.killed).toBe(true)
    expect(r.state).not.toBe('partial')
    expect(r.disagreements).toEqual([])
    expect(r.health).toBe(200)
  }, 120_000)
})
