import { describe, expect, it } from 'vitest'
import { allows, can, capabilitiesOf, CAPABILITY_WORDS, isRole, PERMISSIONS, refusal, ROLE_KEYS, type Capability, type Role } from './permissions'

// The permission table written out by hand, one row per capability, so a change to permissions.ts
// has to be made twice, on purpose. Columns: admin, lead, office, technician, manager.
const Y = true
const N = false
const COLUMNS = ['admin', 'lead', 'office', 'technician', 'manager'] as const
const EXPECTED: Record<string, [boolean, boolean, boolean, boolean, boolean]> = {
  //                   admin lead office tech manager
  'view:fleet':       [Y,    Y,   Y,     Y,   Y],
  'record:work':      [Y,    Y,   Y,     Y,   N],
  'record:any-visit': [Y,    Y,   Y,     N,   N],
  'edit:records':     [Y,    Y,   Y,     N,   N],
  'schedule:visits':  [Y,    Y,   Y,     N,   N],
  'triage:fleet':     [Y,    Y,   N,     N,   N],
  'run:bulk':         [Y,    Y,   N,     N,   N],
  'view:audit':       [Y,    Y,   N,     N,   Y],
  'receive:digest':   [Y,    Y,   N,     N,   Y],
  'manage:users':     [Y,    N,   N,     N,   N],
  'manage:tokens':    [Y,    N,   N,     N,   N],
  'manage:settings':  [Y,    N,   N,     N,   N],
}

describe('permission table', () => {
  it('has exactly the five roles and the capabilities listed here', () => {
    expect([...ROLE_KEYS].sort()).toEqual([...COLUMNS].sort())
    expect(Object.keys(PERMISSIONS).sort()).toEqual(Object.keys(EXPECTED).sort())
  })

  const cells = Object.entries(EXPECTED).flatMap(([capability, row]) =>
    COLUMNS.map((role, i) => ({ capability: capability as Capability, role: role as Role, allowed: row[i] })),
  )
  it.each(cells)('$role may $capability: $allowed', ({ role, capability, allowed }) => {
    expect(can(role, capability)).toBe(allowed)
    expect(allows(role, capability)).toBe(allowed)
  })

  it('lists each role’s capabilities in table order', () => {
    expect(capabilitiesOf('manager')).toEqual(['view:fleet', 'view:audit', 'receive:digest'])
    expect(capabilitiesOf('technician')).toEqual(['view:fleet', 'record:work'])
    expect(capabilitiesOf('admin')).toHaveLength(12)
  })

  it('lets nobody without a session past anything but public routes', () => {
    expect(allows(null, 'public')).toBe(true)
    expect(allows(null, 'signed-in')).toBe(false)
    expect(allows(null, 'view:fleet')).toBe(false)
    for (const role of COLUMNS) expect(allows(role, 'signed-in')).toBe(true)
  })

  it('knows a role name from anything else', () => {
    expect(isRole('office')).toBe(true)
    expect(isRole('Office')).toBe(false)
    expect(isRole('owner')).toBe(false)
    expect(isRole('')).toBe(false)
  })

  it('says in one plain sentence what a role cannot do', () => {
    expect(refusal('office', 'view:audit')).toBe('The Office role cannot read the audit log.')
    expect(refusal('technician', 'manage:users')).toBe('The Technician role cannot invite people, change their roles or deactivate them.')
    for (const c of Object.keys(PERMISSIONS) as Capability[]) expect(CAPABILITY_WORDS[c]).toMatch(/^[a-z][^.]+[a-z]$/)
  })
})
