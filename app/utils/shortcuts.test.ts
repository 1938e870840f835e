import { describe, expect, it } from 'vitest'
import { can, ROLE_KEYS } from '~/domain/permissions'
import { SECTIONS, sectionsFor } from './sections'
import { shortcutsFor } from './shortcuts'

describe('shortcuts per role', () => {
  it.each(ROLE_KEYS)('%s gets a g key for exactly the sections it may open', (role) => {
    const go = shortcutsFor(role).filter((s) => s.group === 'Go to').map((s) => s.id)
    expect(go).toEqual(SECTIONS.filter((s) => can(role, s.capability)).map((s) => `go:${s.to}`))
    expect(sectionsFor(role).map((s) => s.to)).toEqual(SECTIONS.filter((s) => can(role, s.capability)).map((s) => s.to))
  })

  it('leaves office without the administration keys and keeps the rest', () => {
    const ids = shortcutsFor('office').map((s) => s.id)
    expect(ids).not.toContain('go:/admin/users')
    expect(ids).not.toContain('go:/admin/audit')
    expect(ids).toEqual(expect.arrayContaining(['palette', 'help', 'go:/triage', 'go:/visits']))
    expect(shortcutsFor(null).some((s) => s.group === 'Go to')).toBe(false)
  })
})
