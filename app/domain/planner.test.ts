import fc from 'fast-check'
import { describe, expect, it } from 'vitest'
import { calendarFor } from './calendar'
import { addDays } from './dates'
import { DEFAULT_SHIFT_LIMIT_WORKING_DAYS, planCycle, shiftVisits, type CycleDetector, type VisitToShift } from './planner'

// Demo data only: ids, sites and capacities are made up.
let nextId = 1
const site = (siteId: number, count: number, region = 'US-OR'): CycleDetector[] =>
  Array.from({ length: count }, () => ({ id: nextId++, siteId, region }))

describe('planCycle: grouping', () => {
  it("puts each site's detectors together on one visit, earliest working day first", () => {
    const detectors = [...site(1, 2), ...site(2, 3), ...site(3, 1)]
    const plan = planCycle({ detectors, from: '2026-03-09', to: '2026-03-13', technicians: [{ id: 7, dailyCapacity: 10 }] })
    expect(plan.visits).toEqual([
      { siteId: 1, date: '2026-03-09', technicianId: 7, detectorIds: detectors.slice(0, 2).map((d) => d.id) },
      { siteId: 2, date: '2026-03-09', technicianId: 7, detectorIds: detectors.slice(2, 5).map((d) => d.id) },
      { siteId: 3, date: '2026-03-09', technicianId: 7, detectorIds: detectors.slice(5).map((d) => d.id) },
    ])
    expect(plan.unplaced).toEqual([])
    expect(plan.summary).toEqual({ placed: 6, unplaced: 0, visits: 3, days: 1 })
  })

  it('gives the same plan whatever order the detectors come in', () => {
    const detectors = [...site(4, 3), ...site(2, 5), ...site(9, 2), ...site(1, 4)]
    const technicians = [{ id: 1, dailyCapacity: 6 }, { id: 2, dailyCapacity: 4 }]
    const a = planCycle({ detectors, from: '2026-03-09', to: '2026-03-20', technicians })
    const b = planCycle({ detectors: [...detectors].reverse(), from: '2026-03-09', to: '2026-03-20', technicians: [...technicians].reverse() })
    expect(b).toEqual(a)
  })

  it('moves a site that does not fit the room left today to the next working day', () => {
    const detectors = [...site(1, 4), ...site(2, 4), ...site(3, 4)]
    const plan = planCycle({
      detectors,
      from: '2026-03-13', // a Friday
      to: '2026-03-20',
      technicians: [{ id: 1, dailyCapacity: 5 }, { id: 2, dailyCapacity: 5 }],
    })
    expect(plan.visits.map((v) => [v.siteId, v.date, v.technicianId])).toEqual([
      [1, '2026-03-13', 1],
      [2, '2026-03-13', 2], // the technician with most room left takes the next site
      [3, '2026-03-16', 1], // 1 left each on Friday; Monday is the next working day
    ])
  })

  it('spreads many small sites evenly over the technicians', () => {
    const detectors = Array.from({ length: 40 }, (_, i) => site(i + 1, 2)).flat()
    const plan = planCycle({
      detectors,
      from: '2026-03-09',
      to: '2026-03-13',
      technicians: [{ id: 1, dailyCapacity: 10 }, { id: 2, dailyCapacity: 10 }],
    })
    expect(plan.summary).toMatchObject({ placed: 80, unplaced: 0, days: 4 })
    const byTech = (id: number) => plan.visits.filter((v) => v.technicianId === id).length
    expect(byTech(1)).toBe(20)
    expect(byTech(2)).toBe(20)
  })

  it('gives a mid-size site to the technician whose day can hold it', () => {
    const detectors = site(1, 8)
    const plan = planCycle({ detectors, from: '2026-03-09', to: '2026-03-13', technicians: [{ id: 1, dailyCapacity: 3 }, { id: 2, dailyCapacity: 10 }] })
    expect(plan.visits).toHaveLength(1)
    expect(plan.visits[0]).toMatchObject({ technicianId: 2, date: '2026-03-09' })
  })
})

describe('planCycle: splitting a big site', () => {
  it('splits a site bigger than a day over consecutive working days for one technician', () => {
    const detectors = site(5, 25, 'US-TX')
    const plan = planCycle({
      detectors,
      from: '2026-11-25', // Wednesday before Thanksgiving: Thu and Fri are public in Texas
      to: '2026-12-11',
      technicians: [{ id: 3, dailyCapacity: 10 }, { id: 4, dailyCapacity: 10 }],
    })
    expect(plan.visits.map((v) => [v.date, v.technicianId, v.detectorIds.length])).toEqual([
      ['2026-11-25', 3, 10],
      ['2026-11-30', 3, 10],
      ['2026-12-01', 3, 5],
    ])
    expect(plan.visits.flatMap((v) => v.detectorIds)).toEqual(detectors.map((d) => d.id))
  })

  it('places what fits of a big site and lists the rest when the range ends first', () => {
    const detectors = site(6, 25)
    const plan = planCycle({ detectors, from: '2026-03-12', to: '2026-03-13', technicians: [{ id: 1, dailyCapacity: 10 }] })
    expect(plan.summary).toMatchObject({ placed: 20, unplaced: 5, visits: 2 })
    expect(plan.unplaced.map((u) => u.detectorId)).toEqual(detectors.slice(20).map((d) => d.id))
    expect(plan.unplaced[0].reason).toMatch(/range ends before this site is finished/)
  })
})

describe('planCycle: capacity and days off', () => {
  it('never uses Thanksgiving (2026-11-26) in a busy range; Texas also keeps the Friday off', () => {
    const detectors = [...Array.from({ length: 30 }, (_, i) => site(100 + i, 3, 'US-TX')).flat(), ...Array.from({ length: 30 }, (_, i) => site(200 + i, 3, 'US-OR')).flat()]
    const plan = planCycle({ detectors, from: '2026-11-23', to: '2026-12-04', technicians: [{ id: 1, dailyCapacity: 12 }, { id: 2, dailyCapacity: 9 }] })
    const dates = (region: string) => new Set(plan.visits.filter((v) => v.siteId < 200 === (region === 'US-TX')).map((v) => v.date))
    expect(dates('US-TX').has('2026-11-26')).toBe(false)
    expect(dates('US-TX').has('2026-11-27')).toBe(false)
    expect(dates('US-OR').has('2026-11-26')).toBe(false)
    expect(dates('US-OR').has('2026-11-27')).toBe(true)
    expect(plan.summary.unplaced).toBe(0)
  })

  it('lists sites with no room left, in plain words', () => {
    const detectors = [...site(1, 4), ...site(2, 4)]
    const plan = planCycle({ detectors, from: '2026-03-09', to: '2026-03-09', technicians: [{ id: 1, dailyCapacity: 5 }] })
    expect(plan.summary).toMatchObject({ placed: 4, unplaced: 4 })
    expect(plan.unplaced.map((u) => u.siteId)).toEqual([2, 2, 2, 2])
    expect(plan.unplaced[0].reason).toBe('No working day left in the range with room for all 4 detectors of this site')
  })

  it('says why when nothing can be planned', () => {
    const one = site(1, 2)
    const none = (r: ReturnType<typeof planCycle>) => [r.summary.placed, r.unplaced.length, r.unplaced[0].reason]
    expect(none(planCycle({ detectors: one, from: '2026-03-09', to: '2026-03-13', technicians: [] }))).toEqual([0, 2, 'No technician with daily capacity'])
    expect(none(planCycle({ detectors: one, from: '2026-03-09', to: '2026-03-13', technicians: [{ id: 1, dailyCapacity: 0 }] }))).toEqual([0, 2, 'No technician with daily capacity'])
    expect(none(planCycle({ detectors: one, from: '2026-03-07', to: '2026-03-08', technicians: [{ id: 1, dailyCapacity: 5 }] }))).toEqual([0, 2, 'No working day in the range for region US-OR'])
    expect(none(planCycle({ detectors: one, from: '2026-03-13', to: '2026-03-09', technicians: [{ id: 1, dailyCapacity: 5 }] }))[2]).toMatch(/date range is not valid/)
    expect(none(planCycle({ detectors: site(1, 2, 'US-ZZ'), from: '2026-03-09', to: '2026-03-13', technicians: [{ id: 1, dailyCapacity: 5 }] }))[2]).toBe("Unknown holiday region 'US-ZZ' for this site")
  })

  it('plans a detector listed twice only once and says so', () => {
    const [d] = site(1, 1)
    const plan = planCycle({ detectors: [d, d], from: '2026-03-09', to: '2026-03-13', technicians: [{ id: 1, dailyCapacity: 5 }] })
    expect(plan.summary).toMatchObject({ placed: 1, unplaced: 1 })
    expect(plan.unplaced[0].reason).toMatch(/listed more than once/)
  })

  it('uses the calendars given by the caller', () => {
    const closed = (region: string) => calendarFor(region, { extraClosedDays: ['2026-03-09'] })
    const plan = planCycle({ detectors: site(1, 2), from: '2026-03-09', to: '2026-03-13', technicians: [{ id: 1, dailyCapacity: 5 }], calendars: closed })
    expect(plan.visits[0].date).toBe('2026-03-10')
  })
})

// ---------------------------------------------------------------------------------------------
// Properties. Regions with different holidays and a range over the US year-end holidays.

const REGIONS = ['US-TX', 'US-OR', 'US-NY']
const START = '2026-11-16'
const arbRange = fc.record({ offset: fc.integer({ min: 0, max: 45 }), length: fc.integer({ min: 0, max: 25 }) })
  .map(({ offset, length }) => ({ from: addDays(START, offset), to: addDays(START, offset + length) }))

const arbCycle = fc.record({
  sites: fc.array(fc.record({ count: fc.integer({ min: 1, max: 30 }), region: fc.constantFrom(...REGIONS) }), { maxLength: 25 }),
  technicians: fc.uniqueArray(fc.record({ id: fc.integer({ min: 1, max: 6 }), dailyCapacity: fc.integer({ min: 0, max: 14 }) }), { selector: (t) => t.id, maxLength: 4 }),
  range: arbRange,
})

describe('planCycle: properties', () => {
  it('never exceeds capacity, never uses a day off, loses no detector', () => {
    fc.assert(
      fc.property(arbCycle, ({ sites, technicians, range }) => {
        let id = 1
        const detectors = sites.flatMap((s, i) => Array.from({ length: s.count }, () => ({ id: id++, siteId: i + 1, region: s.region })))
        const plan = planCycle({ detectors, technicians, ...range })
        const byId = new Map(detectors.map((d) => [d.id, d]))

        // Capacity per technician per day.
        const load = new Map<string, number>()
        for (const v of plan.visits) load.set(`${v.technicianId}|${v.date}`, (load.get(`${v.technicianId}|${v.date}`) ?? 0) + v.detectorIds.length)
        for (const [key, n] of load) {
          const tech = technicians.find((t) => t.id === Number(key.split('|')[0]))
          expect(tech).toBeDefined()
          expect(n).toBeLessThanOrEqual(tech!.dailyCapacity)
        }
        // Working day of the site's region, inside the range, one site per visit.
        for (const v of plan.visits) {
          expect(v.detectorIds.length).toBeGreaterThan(0)
          const region = byId.get(v.detectorIds[0])!.region
          expect(calendarFor(region).isWorkingDay(v.date)).toBe(true)
          expect(v.date >= range.from && v.date <= range.to).toBe(true)
          for (const d of v.detectorIds) expect(byId.get(d)!.siteId).toBe(v.siteId)
        }
        // Every detector exactly once, placed or listed with a reason.
        const seen = [...plan.visits.flatMap((v) => v.detectorIds), ...plan.unplaced.map((u) => u.detectorId)]
        expect(seen.length).toBe(detectors.length)
        expect(new Set(seen).size).toBe(detectors.length)
        for (const u of plan.unplaced) expect(u.reason.length).toBeGreaterThan(0)
        expect(plan.summary.placed + plan.summary.unplaced).toBe(detectors.length)
        expect(plan.summary.visits).toBe(plan.visits.length)
      }),
      { numRuns: 200 },
    )
  })

  it('keeps a site whole whenever it fits one day of one technician', () => {
    fc.assert(
      fc.property(arbCycle, ({ sites, technicians, range }) => {
        let id = 1
        const detectors = sites.flatMap((s, i) => Array.from({ length: s.count }, () => ({ id: id++, siteId: i + 1, region: s.region })))
        const maxCap = Math.max(0, ...technicians.map((t) => t.dailyCapacity))
        const plan = planCycle({ detectors, technicians, ...range })
        sites.forEach((s, i) => {
          if (s.count > maxCap) return
          expect(plan.visits.filter((v) => v.siteId === i + 1).length).toBeLessThanOrEqual(1)
        })
      }),
      { numRuns: 100 },
    )
  })
})

// ---------------------------------------------------------------------------------------------
// Bulk shift

const visit = (v: Partial<VisitToShift> & Pick<VisitToShift, 'id' | 'date'>): VisitToShift => ({
  siteId: 1,
  region: 'US-TX',
  technicianId: 1,
  detectorCount: 4,
  ...v,
})

describe('shiftVisits', () => {
  it('moves by working days of the site region, across Thanksgiving', () => {
    const r = shiftVisits({
      visits: [visit({ id: 1, date: '2026-11-25' }), visit({ id: 2, date: '2026-11-25', region: 'US-OR', technicianId: 2 })],
      by: { businessDays: 1 },
      capacity: { 1: 10, 2: 10 },
    })
    expect(r.moved).toEqual([
      { id: 1, from: '2026-11-25', to: '2026-11-30' },
      { id: 2, from: '2026-11-25', to: '2026-11-27' },
    ])
    expect(r.unplaced).toEqual([])
  })

  it('moves back with a negative count', () => {
    const r = shiftVisits({ visits: [visit({ id: 1, date: '2026-11-30' })], by: { businessDays: -1 }, capacity: new Map([[1, 10]]) })
    expect(r.moved[0].to).toBe('2026-11-25')
  })

  it('moves to a date, or the next working day when that date is off', () => {
    const r = shiftVisits({
      visits: [visit({ id: 1, date: '2026-11-02' }), visit({ id: 2, date: '2026-11-03', region: 'US-OR' })],
      to: '2026-11-26',
      capacity: { 1: 10 },
    })
    expect(r.moved).toEqual([
      { id: 1, from: '2026-11-02', to: '2026-11-30' },
      { id: 2, from: '2026-11-03', to: '2026-11-27' },
    ])
  })

  it('rolls forward past days already full with other work', () => {
    const r = shiftVisits({
      visits: [visit({ id: 1, date: '2026-03-02', detectorCount: 4 })],
      by: { businessDays: 5 }, // → Monday 9 March
      capacity: { 1: 10 },
      existingLoad: [
        { technicianId: 1, date: '2026-03-09', detectorCount: 8 },
        { technicianId: 1, date: '2026-03-10', detectorCount: 6 },
      ],
    })
    expect(r.moved[0].to).toBe('2026-03-10') // 6 + 4 = 10 fits exactly
  })

  it('counts visits moved in the same call against each other', () => {
    const r = shiftVisits({
      visits: [visit({ id: 1, date: '2026-03-02', detectorCount: 6 }), visit({ id: 2, date: '2026-03-03', detectorCount: 6 })],
      to: '2026-03-09',
      capacity: { 1: 10 },
    })
    expect(r.moved).toEqual([
      { id: 1, from: '2026-03-02', to: '2026-03-09' },
      { id: 2, from: '2026-03-03', to: '2026-03-10' },
    ])
  })

  it('puts no limit on visits with no technician yet', () => {
    const r = shiftVisits({
      visits: [visit({ id: 1, date: '2026-03-02', technicianId: null, detectorCount: 500 })],
      to: '2026-03-09',
      capacity: {},
    })
    expect(r.moved[0].to).toBe('2026-03-09')
  })

  it('explains what it cannot place', () => {
    const r = shiftVisits({
      visits: [
        visit({ id: 1, date: '2026-03-02', detectorCount: 12 }),
        visit({ id: 2, date: '2026-03-02', technicianId: 9 }),
        visit({ id: 3, date: '2026-03-02', region: 'US-ZZ' }),
        visit({ id: 4, date: '2026-03-02' }),
      ],
      to: '2026-03-09',
      capacity: { 1: 10 },
      limitDate: '2026-03-10',
      existingLoad: [
        { technicianId: 1, date: '2026-03-09', detectorCount: 10 },
        { technicianId: 1, date: '2026-03-10', detectorCount: 7 },
      ],
    })
    expect(r.moved).toEqual([])
    expect(r.unplaced).toEqual([
      { id: 1, reason: 'The visit has 12 detectors, more than technician 1 can do in a day (10)' },
      { id: 2, reason: 'No daily capacity is set for technician 9' },
      { id: 3, reason: "Unknown holiday region 'US-ZZ' for this site" },
      { id: 4, reason: 'No working day with room for technician 1 from 2026-03-09 to 2026-03-10' },
    ])
  })

  it(`looks ${DEFAULT_SHIFT_LIMIT_WORKING_DAYS} working days past the target when no limit is given`, () => {
    const cal = calendarFor('US-TX')
    const full = cal.workingDaysBetween('2026-03-09', '2026-12-31').map((date) => ({ technicianId: 1, date, detectorCount: 10 }))
    const r = shiftVisits({ visits: [visit({ id: 1, date: '2026-03-02' })], to: '2026-03-09', capacity: { 1: 10 }, existingLoad: full })
    expect(r.unplaced[0].reason).toBe(`No working day with room for technician 1 from 2026-03-09 to ${cal.addWorkingDays('2026-03-09', 60)}`)
    // With one day free just inside the window, it lands there.
    const last = cal.addWorkingDays('2026-03-09', 60)
    const r2 = shiftVisits({ visits: [visit({ id: 1, date: '2026-03-02' })], to: '2026-03-09', capacity: { 1: 10 }, existingLoad: full.filter((l) => l.date !== last) })
    expect(r2.moved[0].to).toBe(last)
  })

  it('refuses both or neither of a count and a date, and a target after the limit', () => {
    const v = [visit({ id: 1, date: '2026-03-02' })]
    expect(shiftVisits({ visits: v, capacity: { 1: 10 } }).unplaced[0].reason).toMatch(/either a number of working days or a target date/)
    expect(shiftVisits({ visits: v, by: { businessDays: 1 }, to: '2026-03-09', capacity: { 1: 10 } }).unplaced).toHaveLength(1)
    expect(shiftVisits({ visits: v, to: '2026-03-09', limitDate: '2026-03-06', capacity: { 1: 10 } }).unplaced[0].reason).toBe(
      'The target day 2026-03-09 is after the last allowed day 2026-03-06',
    )
  })

  it('keeps a visit that cannot move on its own day, so no other visit lands on a day it still fills', () => {
    // Capacity 10 a day. Visit 2 (Tue 3 March) cannot move to Wed, which is full; it stays, so visit
    // 1 (Mon) cannot take its place on Tue. Placed as if visit 2 had left, Tue would hold 20.
    const r = shiftVisits({
      visits: [visit({ id: 1, date: '2026-03-02', detectorCount: 10 }), visit({ id: 2, date: '2026-03-03', detectorCount: 10 })],
      by: { businessDays: 1 },
      capacity: { 1: 10 },
      existingLoad: [{ technicianId: 1, date: '2026-03-04', detectorCount: 10 }],
      roll: false,
    })
    expect(r.moved).toEqual([])
    expect(r.unplaced.map((u) => u.id)).toEqual([1, 2])
    expect(r.unplaced[0].reason).toMatch(/full on 2026-03-03/)
  })

  it('leaves a visit that would land before the earliest day where it is, and counts it there', () => {
    const r = shiftVisits({
      visits: [visit({ id: 1, date: '2026-03-02', detectorCount: 10 }), visit({ id: 2, date: '2026-03-03', detectorCount: 10 })],
      by: { businessDays: -1 },
      capacity: { 1: 10 },
      earliest: '2026-03-02',
      roll: false,
    })
    // Visit 1 would go to Friday 27 Feb, before the earliest day: it stays on Monday, so Monday is full for visit 2.
    expect(r.moved).toEqual([])
    expect(r.unplaced).toEqual([
      { id: 1, reason: 'Would land on 2026-02-27, before today' },
      { id: 2, reason: expect.stringMatching(/full on 2026-03-02/) },
    ])
  })

  it('never fills a day past capacity, counting the visits left where they were (property)', () => {
    const days = ['2026-03-02', '2026-03-03', '2026-03-04', '2026-03-05', '2026-03-06', '2026-03-09', '2026-03-10']
    const arb = fc.record({
      visits: fc.array(fc.record({ day: fc.integer({ min: 0, max: days.length - 1 }), tech: fc.integer({ min: 1, max: 2 }), n: fc.integer({ min: 1, max: 6 }) }), { maxLength: 14 }),
      booked: fc.array(fc.record({ day: fc.integer({ min: 0, max: days.length - 1 }), tech: fc.integer({ min: 1, max: 2 }), n: fc.integer({ min: 1, max: 6 }) }), { maxLength: 6 }),
      by: fc.integer({ min: -2, max: 3 }).filter((n) => n !== 0),
      roll: fc.boolean(),
    })
    fc.assert(
      fc.property(arb, ({ visits, booked, by, roll }) => {
        const cap = 8
        const input = visits.map((v, i) => visit({ id: i + 1, date: days[v.day], technicianId: v.tech, detectorCount: v.n }))
        const r = shiftVisits({
          visits: input,
          by: { businessDays: by },
          capacity: { 1: cap, 2: cap },
          existingLoad: booked.map((b) => ({ technicianId: b.tech, date: days[b.day], detectorCount: b.n })),
          roll,
          earliest: days[0],
        })
        // Every visit is either moved or left, once.
        expect([...r.moved.map((m) => m.id), ...r.unplaced.map((u) => u.id)].sort((a, b) => a - b)).toEqual(input.map((v) => v.id))
        // The days as they end up: booked work, the visits left where they were, the visits moved.
        const load = new Map<string, number>()
        const add = (tech: number, date: string, n: number) => load.set(`${tech}|${date}`, (load.get(`${tech}|${date}`) ?? 0) + n)
        for (const b of booked) add(b.tech, days[b.day], b.n)
        const left = new Set(r.unplaced.map((u) => u.id))
        for (const v of input) if (left.has(v.id)) add(v.technicianId!, v.date, v.detectorCount)
        for (const m of r.moved) {
          const v = input[m.id - 1]
          add(v.technicianId!, m.to, v.detectorCount)
          expect(m.to >= days[0]).toBe(true)
        }
        // A day a visit moved onto is within capacity, whatever stayed.
        for (const m of r.moved) expect(load.get(`${input[m.id - 1].technicianId}|${m.to}`)!).toBeLessThanOrEqual(cap)
      }),
      { numRuns: 300 },
    )
  })
})

const CAPACITY: Record<number, number> = { 1: 8, 2: 10, 3: 5 }
const arbShift = fc.record({
  visits: fc.uniqueArray(
    fc.record({
      id: fc.integer({ min: 1, max: 500 }),
      region: fc.constantFrom(...REGIONS),
      day: fc.integer({ min: 0, max: 50 }),
      technicianId: fc.constantFrom<number | null>(null, 1, 2, 3),
      detectorCount: fc.integer({ min: 0, max: 10 }),
    }),
    { selector: (v) => v.id, maxLength: 30 },
  ),
  existing: fc.array(fc.record({ technicianId: fc.constantFrom(1, 2, 3), day: fc.integer({ min: 0, max: 70 }), detectorCount: fc.integer({ min: 1, max: 6 }) }), { maxLength: 40 }),
  rule: fc.oneof(
    fc.integer({ min: -5, max: 15 }).map((n) => ({ by: { businessDays: n } })),
    fc.integer({ min: 0, max: 50 }).map((d) => ({ to: addDays(START, d) })),
  ),
  limit: fc.option(fc.integer({ min: 10, max: 90 }), { nil: undefined }),
})

describe('shiftVisits: properties', () => {
  it('never exceeds capacity, never lands on a day off, lands on or after its target, reports every visit', () => {
    fc.assert(
      fc.property(arbShift, ({ visits: raw, existing, rule, limit }) => {
        const visits = raw.map((v) => ({ id: v.id, siteId: v.id, region: v.region, date: addDays(START, v.day), technicianId: v.technicianId, detectorCount: v.detectorCount }))
        const existingLoad = existing.map((e) => ({ technicianId: e.technicianId, date: addDays(START, e.day), detectorCount: e.detectorCount }))
        const limitDate = limit === undefined ? undefined : addDays(START, limit)
        const r = shiftVisits({ visits, ...rule, capacity: CAPACITY, existingLoad, limitDate })

        const ids = [...r.moved.map((m) => m.id), ...r.unplaced.map((u) => u.id)]
        expect(ids.sort((a, b) => a - b)).toEqual(visits.map((v) => v.id).sort((a, b) => a - b))

        const load = new Map<string, number>()
        for (const e of existingLoad) load.set(`${e.technicianId}|${e.date}`, (load.get(`${e.technicianId}|${e.date}`) ?? 0) + e.detectorCount)
        const byId = new Map(visits.map((v) => [v.id, v]))
        for (const m of r.moved) {
          const v = byId.get(m.id)!
          const cal = calendarFor(v.region)
          expect(m.from).toBe(v.date)
          expect(cal.isWorkingDay(m.to)).toBe(true)
          const target = 'by' in rule ? cal.addWorkingDays(v.date, rule.by.businessDays) : cal.nextWorkingDay(rule.to)
          expect(m.to >= target).toBe(true)
          if (limitDate) expect(m.to <= limitDate).toBe(true)
          if (v.technicianId !== null) load.set(`${v.technicianId}|${m.to}`, (load.get(`${v.technicianId}|${m.to}`) ?? 0) + v.detectorCount)
        }
        // Only days a moved visit landed on are checked: the existing load alone may already be over.
        for (const m of r.moved) {
          const v = byId.get(m.id)!
          if (v.technicianId === null) continue
          expect(load.get(`${v.technicianId}|${m.to}`)!).toBeLessThanOrEqual(CAPACITY[v.technicianId])
        }
      }),
      { numRuns: 200 },
    )
  })
})

describe('shiftVisits: without rolling on', () => {
  it('reports a visit whose target day is full instead of moving it further', () => {
    const visits: VisitToShift[] = [
      { id: 1, siteId: 1, region: 'US-OR', date: '2026-03-09', technicianId: 5, detectorCount: 4 },
      { id: 2, siteId: 2, region: 'US-OR', date: '2026-03-09', technicianId: 5, detectorCount: 4 },
    ]
    const r = shiftVisits({ visits, by: { businessDays: 2 }, capacity: { 5: 6 }, roll: false })
    expect(r.moved).toEqual([{ id: 1, from: '2026-03-09', to: '2026-03-11' }])
    expect(r.unplaced).toEqual([{ id: 2, reason: 'Technician 5 is full on 2026-03-11: 2 of 6 left, the visit needs 4' }])
  })
})

// ---------------------------------------------------------------------------------------------
// Regions, capacity in visits, work already booked, most overdue first.

describe('planCycle: regions, visits as capacity, booked work and urgency', () => {
  it('gives each site only to a technician covering its region, and says when none does', () => {
    const detectors = [...site(1, 2, 'US-TX'), ...site(2, 2, 'US-OR'), ...site(3, 2, 'US-NY')]
    const plan = planCycle({
      detectors,
      from: '2026-03-09',
      to: '2026-03-13',
      technicians: [{ id: 1, dailyCapacity: 10, regions: ['US-TX'] }, { id: 2, dailyCapacity: 10, regions: ['us-or', 'US-WA'] }],
    })
    expect(plan.visits.map((v) => [v.siteId, v.technicianId])).toEqual([[1, 1], [2, 2]])
    expect(plan.unplaced.map((u) => [u.siteId, u.reason])).toEqual([[3, 'No chosen technician covers region US-NY'], [3, 'No chosen technician covers region US-NY']])
  })

  it('places the most overdue site first when the days are short', () => {
    const detectors = [...site(1, 4).map((d) => ({ ...d, dueOn: '2026-04-01' })), ...site(2, 4).map((d) => ({ ...d, dueOn: '2026-01-05' })), ...site(3, 4)]
    const plan = planCycle({ detectors, from: '2026-03-09', to: '2026-03-10', technicians: [{ id: 1, dailyCapacity: 4 }] })
    expect(plan.visits.map((v) => [v.siteId, v.date])).toEqual([[1, '2026-03-10'], [2, '2026-03-09']])
    expect(new Set(plan.unplaced.map((u) => u.siteId))).toEqual(new Set([3]))
  })

  it('counts visits for a technician whose capacity is in visits, after the work already booked', () => {
    const detectors = [...site(1, 9), ...site(2, 9), ...site(3, 9)]
    const plan = planCycle({
      detectors,
      from: '2026-03-09',
      to: '2026-03-10',
      technicians: [{ id: 1, dailyCapacity: 2, capacityUnit: 'visits' }],
      booked: [{ technicianId: 1, date: '2026-03-09', amount: 1 }],
    })
    expect(plan.visits.map((v) => [v.siteId, v.date, v.detectorIds.length])).toEqual([[1, '2026-03-09', 9], [2, '2026-03-10', 9], [3, '2026-03-10', 9]])
  })
})

const arbRegionCycle = fc.record({
  sites: fc.array(fc.record({ count: fc.integer({ min: 1, max: 12 }), region: fc.constantFrom(...REGIONS), due: fc.option(fc.integer({ min: 0, max: 400 }), { nil: undefined }) }), { maxLength: 25 }),
  technicians: fc.uniqueArray(
    fc.record({
      id: fc.integer({ min: 1, max: 6 }),
      dailyCapacity: fc.integer({ min: 0, max: 14 }),
      capacityUnit: fc.constantFrom<'detectors' | 'visits'>('detectors', 'visits'),
      regions: fc.option(fc.subarray(REGIONS, { minLength: 1 }), { nil: undefined }),
    }),
    { selector: (t) => t.id, maxLength: 4 },
  ),
  booked: fc.array(fc.record({ tech: fc.integer({ min: 1, max: 6 }), day: fc.integer({ min: 0, max: 60 }), amount: fc.integer({ min: 1, max: 6 }) }), { maxLength: 8 }),
  range: arbRange,
})

describe('planCycle: region and capacity properties', () => {
  it('never sends a technician outside their regions or over their day (in their own unit, with booked work), never on a closed day, and loses no detector', () => {
    const closed = ['2026-11-18', '2026-12-02']
    const calendars = (region: string) => calendarFor(region, { extraClosedDays: closed })
    fc.assert(
      fc.property(arbRegionCycle, ({ sites, technicians, booked, range }) => {
        let id = 1
        const detectors = sites.flatMap((s, i) => Array.from({ length: s.count }, () => ({ id: id++, siteId: i + 1, region: s.region, dueOn: s.due === undefined ? undefined : addDays('2025-06-01', s.due) })))
        const bookedLoad = booked.map((b) => ({ technicianId: b.tech, date: addDays(START, b.day), amount: b.amount }))
        const plan = planCycle({ detectors, technicians, booked: bookedLoad, calendars, ...range })
        const byId = new Map(detectors.map((d) => [d.id, d]))
        const load = new Map<string, number>()
        for (const b of bookedLoad) load.set(`${b.technicianId}|${b.date}`, (load.get(`${b.technicianId}|${b.date}`) ?? 0) + b.amount)
        for (const v of plan.visits) {
          const tech = technicians.find((t) => t.id === v.technicianId)!
          const region = byId.get(v.detectorIds[0])!.region
          if (tech.regions) expect(tech.regions).toContain(region)
          expect(calendars(region).isWorkingDay(v.date)).toBe(true)
          expect(closed).not.toContain(v.date)
          const k = `${v.technicianId}|${v.date}`
          load.set(k, (load.get(k) ?? 0) + (tech.capacityUnit === 'visits' ? 1 : v.detectorIds.length))
        }
        for (const v of plan.visits) {
          const tech = technicians.find((t) => t.id === v.technicianId)!
          const k = `${v.technicianId}|${v.date}`
          const already = bookedLoad.filter((b) => `${b.technicianId}|${b.date}` === k).reduce((n, b) => n + b.amount, 0)
          // Booked work may already fill a day; the plan adds nothing to a day past its capacity.
          expect(load.get(k)! - already === 0 || load.get(k)! <= tech.dailyCapacity).toBe(true)
        }
        const seen = [...plan.visits.flatMap((v) => v.detectorIds), ...plan.unplaced.map((u) => u.detectorId)]
        expect(seen.length).toBe(detectors.length)
        expect(new Set(seen).size).toBe(detectors.length)
      }),
      { numRuns: 200 },
    )
  })

  it('books sites of one size and region no later than any less overdue site', () => {
    fc.assert(
      fc.property(
        fc.array(fc.integer({ min: 0, max: 300 }), { minLength: 1, maxLength: 30 }),
        fc.integer({ min: 1, max: 6 }),
        fc.integer({ min: 1, max: 3 }),
        arbRange,
        (dues, size, techCount, range) => {
          let id = 1
          const detectors = dues.flatMap((due, i) => Array.from({ length: size }, () => ({ id: id++, siteId: i + 1, region: 'US-OR', dueOn: addDays('2025-06-01', due) })))
          const technicians = Array.from({ length: techCount }, (_, i) => ({ id: i + 1, dailyCapacity: 8 }))
          const plan = planCycle({ detectors, technicians, ...range })
          const dateOf = new Map(plan.visits.map((v) => [v.siteId, v.date]))
          dues.forEach((a, i) =>
            dues.forEach((b, j) => {
              if (a >= b) return
              // Site i is more overdue than site j: j may not be booked earlier, nor booked while i is left out.
              if (dateOf.has(j + 1)) {
                expect(dateOf.has(i + 1)).toBe(true)
                expect(dateOf.get(i + 1)! <= dateOf.get(j + 1)!).toBe(true)
              }
            }),
          )
        },
      ),
      { numRuns: 200 },
    )
  })
})
