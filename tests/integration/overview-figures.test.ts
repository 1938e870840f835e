import { afterAll, describe, expect, it } from 'vitest'
import { overviewFigures } from '~/.server/repos/overview'
import { seededDb, TEST_TODAY } from '#tests/setup/temp-db'

describe('overview figures', () => {
  const data = seededDb('demo')
  afterAll(() => data.cleanup())

  it('counts detectors and overdue detectors per environment as a plain count over the table does', () => {
    const expected = data.db.$client
      .prepare("select environment, count(*) as detectors, sum(due_status = 'overdue') as overdue from detectors group by environment order by detectors desc, environment")
      .all()
    const figures = overviewFigures(data.db, TEST_TODAY)
    expect(figures.byEnvironment).toEqual(expected)
    expect(figures.byEnvironment.some((e) => e.overdue > 0)).toBe(true)
    // The figures above the table read the same table.
    expect(figures.overdue).toBe(figures.byEnvironment.reduce((n, e) => n + e.overdue, 0))
    expect(figures.detectors).toBe(figures.byEnvironment.reduce((n, e) => n + e.detectors, 0))
  })
})
