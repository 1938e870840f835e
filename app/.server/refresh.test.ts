import { afterAll, describe, expect, it } from 'vitest'
import { addDays } from '~/domain/dates'
import { seededDb, TEST_TODAY } from '#tests/setup/temp-db'
import { refreshDerived } from './refresh'

describe('refreshDerived', () => {
  const s = seededDb('small')
  afterAll(() => s.cleanup())
  const q = s.db.$client
  const overdue = () => (q.prepare("select count(*) as n from detectors where due_status = 'overdue'").get() as { n: number }).n

  it('changes nothing on the day the data was made for', () => {
    expect(refreshDerived(s.db, TEST_TODAY).changed).toBe(0)
  })

  it('moves detectors to overdue as the calendar turns, and scores them higher', () => {
    const before = overdue()
    const risk = (q.prepare('select sum(risk_score) as n from detectors').get() as { n: number }).n
    const result = refreshDerived(s.db, addDays(TEST_TODAY, 120))
    expect(result.changed).toBeGreaterThan(0)
    expect(overdue()).toBeGreaterThan(before)
    expect((q.prepare('select sum(risk_score) as n from detectors').get() as { n: number }).n).toBeGreaterThan(risk)
    // Every stored status agrees with the stored date against that day.
    const wrong = q.prepare("select count(*) as n from detectors where (due_status = 'overdue') != (next_due_on < ?)").get(addDays(TEST_TODAY, 120)) as { n: number }
    expect(wrong.n).toBe(0)
  })
})
