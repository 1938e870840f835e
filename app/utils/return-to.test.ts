import { describe, expect, it } from 'vitest'
import { safeReturnTo } from './return-to'

describe('safeReturnTo', () => {
  it('keeps same-site paths with their query and hash', () => {
    expect(safeReturnTo('/admin/users?x=1#top')).toBe('/admin/users?x=1#top')
  })
  it.each(['//evil.test', '/\\evil.test', 'https://evil.test/', 'javascript:alert(1)', '', null, undefined, 'admin', '/sign-in', '/auth/callback?code=1', '/.//evil.test/x', '/a/..//evil.test', '/%2e//evil.test', '/x/../\\evil.test'])(
    'falls back to / for %s',
    (value) => expect(safeReturnTo(value)).toBe('/'),
  )
})
