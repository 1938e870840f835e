import fc from 'fast-check'
import { describe, expect, it } from 'vitest'
import { triage, type TriageInput } from './triage'

const healthy: TriageInput = {
  state: 'normal',
  dueStatus: 'ok',
  daysOverdue: -40,
  lastResult: 'pass',
  diagnosisFailed: false,
  troubles30d: 0,
  environment: 'clean',
  housing: 'standard',
  delayAgreement: 'agree',
}
const codes = (input: Partial<TriageInput>) => triage({ ...healthy, ...input }).reasons.map((r) => [r.code, r.points])

// Weights are the product's own scale (see triage.ts), not a trade figure.
describe('triage: each reason', () => {
  it('a detector with nothing wrong scores 0 with no reasons', () => {
    expect(triage(healthy)).toEqual({ score: 0, reasons: [] })
    expect(triage({ ...healthy, lastResult: null, dueStatus: 'due-soon', troubles30d: 1 })).toEqual({ score: 0, reasons: [] })
  })

  it('live state at the panel', () => {
    expect(codes({ state: 'trouble' })).toEqual([['in-trouble', 40]])
    expect(codes({ state: 'alarm' })).toEqual([['in-alarm', 45]])
    expect(codes({ state: 'supervisory' })).toEqual([['in-alarm', 45]])
    expect(codes({ state: 'out-of-service' })).toEqual([['out-of-service', 35]])
    expect(triage({ ...healthy, state: 'supervisory' }).reasons[0].text).toBe('Showing supervisory now')
  })

  it('overdue: 10 points plus 2 a month, at most 30, only when the status is overdue', () => {
    expect(codes({ dueStatus: 'overdue', daysOverdue: 1 })).toEqual([['overdue', 10]])
    expect(codes({ dueStatus: 'overdue', daysOverdue: 29 })).toEqual([['overdue', 10]])
    expect(codes({ dueStatus: 'overdue', daysOverdue: 60 })).toEqual([['overdue', 14]])
    expect(codes({ dueStatus: 'overdue', daysOverdue: 300 })).toEqual([['overdue', 30]])
    expect(codes({ dueStatus: 'overdue', daysOverdue: 3000 })).toEqual([['overdue', 30]])
    expect(codes({ dueStatus: 'due-soon', daysOverdue: 5 })).toEqual([])
    expect(triage({ ...healthy, dueStatus: 'overdue', daysOverdue: 1 }).reasons[0].text).toBe('Overdue by 1 day')
    expect(triage({ ...healthy, dueStatus: 'overdue', daysOverdue: 45 }).reasons[0].text).toBe('Overdue by 45 days')
  })

  it('failed test and failed diagnosis', () => {
    expect(codes({ lastResult: 'fail' })).toEqual([['failed-test', 25]])
    expect(codes({ diagnosisFailed: true })).toEqual([['failed-diagnosis', 25]])
  })

  it('repeated troubles: from 2 in 30 days, 5 points each, at most 20', () => {
    expect(codes({ troubles30d: 1 })).toEqual([])
    expect(codes({ troubles30d: 2 })).toEqual([['repeated-troubles', 10]])
    expect(codes({ troubles30d: 3 })).toEqual([['repeated-troubles', 15]])
    expect(codes({ troubles30d: 9 })).toEqual([['repeated-troubles', 20]])
  })

  it('humid location with a standard housing; rated housings and dry places are fine', () => {
    expect(codes({ environment: 'humid', housing: 'standard' })).toEqual([['humid-unrated', 10]])
    expect(codes({ environment: 'humid', housing: 'nema4' })).toEqual([])
    expect(codes({ environment: 'humid', housing: 'nema4x' })).toEqual([])
    expect(codes({ environment: 'kitchen', housing: 'standard' })).toEqual([])
  })

  it('reporting delay against site policy', () => {
    expect(codes({ delayAgreement: 'disagree' })).toEqual([['delay-disagrees', 10]])
    expect(codes({ delayAgreement: 'unknown' })).toEqual([['delay-unknown', 3]])
  })
})

describe('triage: score and order', () => {
  it('adds the points and lists the heaviest first, ties by code', () => {
    const r = triage({
      ...healthy,
      state: 'trouble',
      dueStatus: 'overdue',
      daysOverdue: 10,
      lastResult: 'fail',
      diagnosisFailed: true,
      troubles30d: 2,
      environment: 'humid',
      housing: 'standard',
      delayAgreement: 'disagree',
    })
    expect(r.reasons.map((x) => [x.code, x.points])).toEqual([
      ['in-trouble', 40],
      ['failed-diagnosis', 25],
      ['failed-test', 25],
      ['delay-disagrees', 10],
      ['humid-unrated', 10],
      ['overdue', 10],
      ['repeated-troubles', 10],
    ])
    expect(r.score).toBe(130)
  })

  const arbInput: fc.Arbitrary<TriageInput> = fc.record({
    state: fc.constantFrom('normal', 'alarm', 'trouble', 'supervisory', 'out-of-service'),
    dueStatus: fc.constantFrom('ok', 'due-soon', 'overdue'),
    daysOverdue: fc.integer({ min: -400, max: 4000 }),
    lastResult: fc.constantFrom('pass', 'fail', null),
    diagnosisFailed: fc.boolean(),
    troubles30d: fc.integer({ min: 0, max: 12 }),
    environment: fc.constantFrom('clean', 'dusty', 'kitchen', 'humid'),
    housing: fc.constantFrom('standard', 'nema4', 'nema4x'),
    delayAgreement: fc.constantFrom('agree', 'disagree', 'unknown'),
  })

  it('score is always the sum of the reasons, each code once, order by points then code', () => {
    fc.assert(
      fc.property(arbInput, (input) => {
        const { score, reasons } = triage(input)
        expect(score).toBe(reasons.reduce((s, r) => s + r.points, 0))
        expect(new Set(reasons.map((r) => r.code)).size).toBe(reasons.length)
        for (let i = 1; i < reasons.length; i++) {
          const [a, b] = [reasons[i - 1], reasons[i]]
          expect(a.points > b.points || (a.points === b.points && a.code < b.code)).toBe(true)
        }
        for (const r of reasons) expect(r.points).toBeGreaterThan(0)
      }),
      { numRuns: 200 },
    )
  })
})
