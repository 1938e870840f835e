import { describe, expect, it } from 'vitest'
import { siteDateTime, siteDay, siteTime } from './time-format'

describe('site time', () => {
  it("reads an instant on the site's clock with the zone's letters, summer and winter", () => {
    expect(siteTime('2026-06-15T21:05:00Z', 'America/Los_Angeles')).toBe('14:05 PDT')
    expect(siteTime('2026-01-15T21:05:00Z', 'America/Los_Angeles')).toBe('13:05 PST')
    expect(siteTime('2026-06-15T21:05:00Z', 'America/Phoenix')).toBe('14:05 MST')
    expect(siteTime('2026-06-15T21:05:00Z', 'America/New_York')).toBe('17:05 EDT')
    expect(siteTime('2026-06-16T04:30:00Z', 'America/Chicago')).toBe('23:30 CDT')
  })

  it("dates an instant by the site's day, not the UTC day", () => {
    // 04:30 UTC on the 16th is still the evening of the 15th in Chicago.
    expect(siteDay('2026-06-16T04:30:00Z', 'America/Chicago')).toBe('2026-06-15')
    expect(siteDay('2026-06-16T04:30:00Z', 'UTC')).toBe('2026-06-16')
    expect(siteDateTime('2026-06-16T04:30:00Z', 'America/Chicago')).toBe('15 Jun 2026, 23:30 CDT')
    expect(siteDateTime('2026-12-01T00:00:00Z', 'America/Denver')).toBe('30 Nov 2026, 17:00 MST')
  })

  it('keeps midnight as 00, never 24', () => {
    expect(siteTime('2026-06-15T07:00:00Z', 'America/Los_Angeles')).toBe('00:00 PDT')
  })
})
