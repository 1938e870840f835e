import { afterAll, describe, expect, it } from 'vitest'
import { addDays } from '~/domain/dates'
import { seededDb, TEST_TODAY } from '#tests/setup/temp-db'
import { checkDatabase } from './db-check'
import { dayTurnCandidates, deriveInput, derivedDay, fleetInputs, turnPlan } from './derivation'
import { refreshDerived, refreshIfNewDay } from './refresh'

/** Brute force, independent of the candidate ranges: every detector whose derivation differs between two days. */
function changedBetween(db: Parameters<typeof fleetInputs>[0], from: string, to: string): number[] {
  const out: number[] = []
  for (const inputs of fleetInputs(db, to)) {
    for (const input of inputs) {
      const a = deriveInput(input, from).stored
      const b = deriveInput(input, to).stored
      if (JSON.stringify(a) !== JSON.stringify(b)) out.push(input.id)
    }
  }
  return out
}

describe('refreshing the stored facts as the office day turns', () => {
  const s = seededDb('small')
  afterAll(() => s.cleanup())
  const q = s.db.$client
  const overdue = () => (q.prepare("select count(*) as n from detectors where due_status = 'overdue'").get() as { n: number }).n

  it('starts from the day the seed derived for, and changes nothing on that day', async () => {
    expect(derivedDay(s.db)).toBe(TEST_TODAY)
    expect(refreshDerived(s.db, TEST_TODAY).changed).toBe(0)
    expect(await refreshIfNewDay(s.db, TEST_TODAY)).toBeNull()
  })

  it('finds on its indexes every detector a day turn changes', () => {
    for (const [from, to] of [
      [TEST_TODAY, addDays(TEST_TODAY, 1)],
      [TEST_TODAY, addDays(TEST_TODAY, 7)],
      [TEST_TODAY, addDays(TEST_TODAY, 45)],
    ] as const) {
      const truth = changedBetween(s.db, from, to)
      const candidates = new Set(dayTurnCandidates(s.db, from, to))
      if (to === addDays(TEST_TODAY, 45)) expect(truth.length).toBeGreaterThan(0)
      expect(truth.filter((id) => !candidates.has(id))).toEqual([])
      // And it is a narrow set, not the fleet.
      expect(candidates.size).toBeLessThan(200)
    }
  })

  it('plans nothing, the candidates or the whole fleet', () => {
    expect(turnPlan('2026-06-15', '2026-06-15')).toBe('none')
    expect(turnPlan('2026-06-15', '2026-06-16')).toBe('candidates')
    expect(turnPlan(null, '2026-06-16')).toBe('fleet')
    expect(turnPlan('2026-06-16', '2026-06-15')).toBe('fleet')
    expect(turnPlan('2026-01-01', '2026-06-15')).toBe('fleet')
  })

  it('turns the day through the candidates, leaves no disagreement, and a restart does not redo it', async () => {
    const before = overdue()
    const to = addDays(TEST_TODAY, 20)
    const result = await refreshIfNewDay(s.db, to)
    expect(result).toMatchObject({ from: TEST_TODAY, to, plan: 'candidates' })
    expect(result!.changed).toBeGreaterThan(0)
    expect(overdue()).toBeGreaterThan(before)
    expect(checkDatabase(s.db, to, { integrity: 'none' }).disagreements).toEqual([])
    expect(derivedDay(s.db)).toBe(to)
    expect(await refreshIfNewDay(s.db, to)).toBeNull()
  })

  it('walks the whole fleet after a long gap and scores late detectors higher', () => {
    const risk = (q.prepare('select sum(risk_score) as n from detectors').get() as { n: number }).n
    const day = addDays(TEST_TODAY, 120)
    expect(refreshDerived(s.db, day).changed).toBeGreaterThan(0)
    expect((q.prepare('select sum(risk_score) as n from detectors').get() as { n: number }).n).toBeGreaterThan(risk)
    expect(checkDatabase(s.db, day, { integrity: 'none' }).disagreements).toEqual([])
  })
})
