import fc from 'fast-check'
import { describe, expect, it } from 'vitest'
import { OVERDUE_BASE, overduePoints, triage, type TriageInput } from './triage'

const healthy: TriageInput = {
  state: 'normal',
  overdue: [],
  lastResult: 'pass',
  diagnosisFailed: false,
  supervisionUnproven: false,
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
    expect(triage({ ...healthy, lastResult: null, troubles30d: 1 })).toEqual({ score: 0, reasons: [] })
  })

  it('live state at the panel', () => {
    expect(codes({ state: 'trouble' })).toEqual([['in-trouble', 40]])
    expect(codes({ state: 'alarm' })).toEqual([['in-alarm', 45]])
    expect(codes({ state: 'supervisory' })).toEqual([['in-alarm', 45]])
    expect(codes({ state: 'out-of-service' })).toEqual([['out-of-service', 35]])
    expect(triage({ ...healthy, state: 'supervisory' }).reasons[0].text).toBe('Showing supervisory now')
  })

  // Hand-worked: a functional test 1 day past its window starts at 20; 60 days past it has made two
  // 30-day steps (+4) = 24; 300 days makes all ten fast steps (+20) = 40; 3,000 days adds
  // floor((3000 − 300) / 90) = 30 slow points = 70. The cleaning interval, 45 days past: 6 + 2 = 8.
  it('overdue: the task sets the start, 2 points a month for ten months, then 1 every 90 days without a cap', () => {
    expect(codes({ overdue: [{ task: 'functional', days: 1 }] })).toEqual([['overdue', 20]])
    expect(codes({ overdue: [{ task: 'functional', days: 29 }] })).toEqual([['overdue', 20]])
    expect(codes({ overdue: [{ task: 'functional', days: 60 }] })).toEqual([['overdue', 24]])
    expect(codes({ overdue: [{ task: 'functional', days: 300 }] })).toEqual([['overdue', 40]])
    expect(codes({ overdue: [{ task: 'functional', days: 389 }] })).toEqual([['overdue', 40]])
    expect(codes({ overdue: [{ task: 'functional', days: 390 }] })).toEqual([['overdue', 41]])
    expect(codes({ overdue: [{ task: 'functional', days: 3000 }] })).toEqual([['overdue', 70]])
    expect(codes({ overdue: [{ task: 'cleaning', days: 45 }] })).toEqual([['overdue', 8]])
    expect(codes({ overdue: [{ task: 'visual', days: 1 }] })).toEqual([['overdue', 8]])
    expect(codes({ overdue: [{ task: 'sensitivity', days: 1 }] })).toEqual([['overdue', 14]])
  })

  it('the overdue reason names the task, weightiest first, and counts the weightiest once', () => {
    expect(triage({ ...healthy, overdue: [{ task: 'visual', days: 1 }] }).reasons[0].text).toBe('Visual inspection overdue by 1 day')
    const both = triage({ ...healthy, overdue: [{ task: 'cleaning', days: 200 }, { task: 'functional', days: 45 }] })
    // Functional 45 days: 20 + 2 = 22. Cleaning 200 days: 6 + 2 × 6 = 18. The functional test leads.
    expect(both.reasons).toEqual([{ code: 'overdue', points: 22, text: 'Functional test overdue by 45 days; also cleaning' }])
    const all = triage({ ...healthy, overdue: [{ task: 'visual', days: 5296 }, { task: 'cleaning', days: 5420 }, { task: 'functional', days: 5082 }] })
    // Functional 5,082 days: 20 + 20 + floor(4,782 / 90) = 93; the others are named, not counted again.
    expect(all.reasons).toEqual([{ code: 'overdue', points: 93, text: 'Functional test overdue by over 13 years; also visual check, cleaning' }])
    // Under two years, the days themselves.
    expect(triage({ ...healthy, overdue: [{ task: 'functional', days: 729 }] }).reasons[0].text).toBe('Functional test overdue by 729 days')
  })

  it('an overdue functional test outweighs an overdue cleaning, sensitivity or visual check as late', () => {
    fc.assert(
      fc.property(fc.integer({ min: 1, max: 20_000 }), (days) => {
        const p = (task: keyof typeof OVERDUE_BASE) => overduePoints(task, days)
        expect(p('functional')).toBeGreaterThan(p('sensitivity'))
        expect(p('sensitivity')).toBeGreaterThan(p('visual'))
        expect(p('visual')).toBeGreaterThan(p('cleaning'))
      }),
    )
  })

  it('points never fall as lateness grows, and keep growing past ten months', () => {
    fc.assert(
      fc.property(fc.constantFrom('functional', 'sensitivity', 'visual', 'cleaning' as const), fc.integer({ min: 0, max: 20_000 }), fc.integer({ min: 0, max: 5_000 }), (task, days, more) => {
        expect(overduePoints(task, days + more)).toBeGreaterThanOrEqual(overduePoints(task, days))
        // Any 90 days past the tenth month add at least a point: no cap.
        if (days >= 300) expect(overduePoints(task, days + 90)).toBeGreaterThan(overduePoints(task, days))
      }),
    )
    expect(overduePoints('functional', 0)).toBe(0)
  })

  it('failed test and failed diagnosis: one miswire fails both, and counts once', () => {
    expect(codes({ lastResult: 'fail' })).toEqual([['failed-test', 25]])
    expect(codes({ diagnosisFailed: true })).toEqual([['failed-diagnosis', 25]])
    // Both listed, so either filter finds it; the points are the failed test's alone.
    expect(codes({ lastResult: 'fail', diagnosisFailed: true })).toEqual([['failed-test', 25], ['failed-diagnosis', 0]])
    expect(triage({ ...healthy, lastResult: 'fail', diagnosisFailed: true }).score).toBe(25)
  })

  it('a loop never shown to report trouble counts; a failed diagnosis already covers it', () => {
    expect(codes({ supervisionUnproven: true })).toEqual([['supervision-unproven', 8]])
    expect(codes({ supervisionUnproven: true, diagnosisFailed: true })).toEqual([['failed-diagnosis', 25]])
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
      overdue: [{ task: 'visual', days: 10 }],
      lastResult: 'fail',
      diagnosisFailed: true,
      troubles30d: 2,
      environment: 'humid',
      housing: 'standard',
      delayAgreement: 'disagree',
    })
    // Visual 10 days past its window: 8. The miswire counts once: 25 for the failed test, 0 beside it.
    expect(r.reasons.map((x) => [x.code, x.points])).toEqual([
      ['in-trouble', 40],
      ['failed-test', 25],
      ['delay-disagrees', 10],
      ['humid-unrated', 10],
      ['repeated-troubles', 10],
      ['overdue', 8],
      ['failed-diagnosis', 0],
    ])
    expect(r.score).toBe(103)
  })

  const arbInput: fc.Arbitrary<TriageInput> = fc.record({
    state: fc.constantFrom('normal', 'alarm', 'trouble', 'supervisory', 'out-of-service'),
    overdue: fc.uniqueArray(fc.record({ task: fc.constantFrom('visual', 'functional', 'sensitivity', 'cleaning' as const), days: fc.integer({ min: 1, max: 4000 }) }), { selector: (t) => t.task, maxLength: 4 }),
    lastResult: fc.constantFrom('pass', 'fail', null),
    diagnosisFailed: fc.boolean(),
    supervisionUnproven: fc.boolean(),
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
        // Only the wiring fault behind a failed test is listed without points (counted once, there).
        for (const r of reasons) expect(r.points > 0 || (r.code === 'failed-diagnosis' && input.lastResult === 'fail')).toBe(true)
      }),
      { numRuns: 200 },
    )
  })
})
