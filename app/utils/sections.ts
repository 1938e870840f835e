import type { Capability } from '~/domain/permissions'

// The console's sections, in one list: the navigation rail, the palette and the `g` shortcuts read it.
// A section is added here only when its page exists.
export interface Section {
  to: string
  label: string
  /** Second key after `g`. */
  key: string
  capability: Capability
  group?: 'admin'
}

export const SECTIONS: Section[] = [
  { to: '/', label: 'Overview', key: 'o', capability: 'view:fleet' },
  { to: '/admin/users', label: 'Users', key: 'u', capability: 'manage:users', group: 'admin' },
  { to: '/admin/tokens', label: 'API tokens', key: 't', capability: 'manage:tokens', group: 'admin' },
  { to: '/admin/audit', label: 'Audit log', key: 'l', capability: 'view:audit', group: 'admin' },
]
