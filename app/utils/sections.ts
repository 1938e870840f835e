import { can, type Capability, type Role } from '~/domain/permissions'

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
  { to: '/my-day', label: 'My day', key: 'm', capability: 'record:work' },
  { to: '/triage', label: 'Triage', key: 't', capability: 'view:fleet' },
  { to: '/overview', label: 'Overview', key: 'o', capability: 'view:fleet' },
  { to: '/devices', label: 'Detectors', key: 'd', capability: 'view:fleet' },
  { to: '/sites', label: 'Sites', key: 's', capability: 'view:fleet' },
  { to: '/customers', label: 'Customers', key: 'c', capability: 'view:fleet' },
  { to: '/visits', label: 'Visits', key: 'v', capability: 'view:fleet' },
  { to: '/events', label: 'Events', key: 'e', capability: 'view:fleet' },
  { to: '/import', label: 'Import', key: 'i', capability: 'edit:records' },
  { to: '/delay-audit', label: 'Delay audit', key: 'r', capability: 'schedule:visits' },
  { to: '/cycles', label: 'Cleaning cycles', key: 'y', capability: 'schedule:visits' },
  { to: '/settings', label: 'Digest settings', key: 'n', capability: 'receive:digest' },
  { to: '/admin/users', label: 'Users', key: 'u', capability: 'manage:users', group: 'admin' },
  { to: '/admin/tokens', label: 'API tokens', key: 'k', capability: 'manage:tokens', group: 'admin' },
  { to: '/admin/audit', label: 'Audit log', key: 'a', capability: 'view:audit', group: 'admin' },
  { to: '/admin/calendar', label: 'Company calendar', key: 'l', capability: 'manage:settings', group: 'admin' },
  { to: '/admin/outbox', label: 'Outbox', key: 'b', capability: 'manage:settings', group: 'admin' },
]

/** The sections a role may open: the rail, the `g` keys, the help overlay and the palette show only these. */
export function sectionsFor(role: Role): Section[] {
  return SECTIONS.filter((s) => can(role, s.capability))
}

/**
 * Where each role lands after sign-in: the queue for those who triage or schedule, their own visits
 * for those who record work, else the overview.
 */
export function homeFor(canTriageOrSchedule: boolean, recordsWork = false) {
  if (canTriageOrSchedule) return '/triage'
  return recordsWork ? '/my-day' : '/overview'
}
