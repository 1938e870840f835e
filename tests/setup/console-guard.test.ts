import { describe, expect, it } from 'vitest'
import { allowConsoleError, checkConsoleErrors } from './console-guard'

describe('console.error guard', () => {
  it('hands the messages to a test that allowed them', () => {
    const logged = allowConsoleError()
    console.error('relay %s failed', 'R2')
    console.error(new Error('loop open'))
    expect(logged).toHaveLength(2)
    expect(logged[0]).toBe('relay R2 failed')
    expect(logged[1]).toMatch(/^Error: loop open/)
  })

  it('fails on a message nobody allowed, quoting it', () => {
    console.error('unexpected trouble on zone %d', 4)
    expect(() => checkConsoleErrors('here')).toThrow(/Unexpected console\.error here[\s\S]*unexpected trouble on zone 4/)
    // The check cleared what it reported, so the test itself ends clean.
    expect(() => checkConsoleErrors('here')).not.toThrow()
  })

  it('forgets the allowance when the next test starts', () => {
    console.error('not allowed this time')
    expect(() => checkConsoleErrors('here')).toThrow(/not allowed this time/)
  })
})
