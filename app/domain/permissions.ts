// The whole permission table: which roles hold each capability. Loaders, actions and API routes ask
// `can`; nothing compares role names inline. The UI calls `can` only to hide what would be refused.
export const ROLE_KEYS = ['admin', 'lead', 'office', 'technician', 'manager'] as const
export type Role = (typeof ROLE_KEYS)[number]

export const ROLE_LABELS: Record<Role, string> = {
  admin: 'Administrator',
  lead: 'Operations lead',
  office: 'Office',
  technician: 'Technician',
  manager: 'Manager',
}

const everyone: Role[] = [...ROLE_KEYS]

export const PERMISSIONS = {
  /** Read customers, sites, units, detectors, events, visits. */
  'view:fleet': everyone,
  /** Record readings, notifications and results; technicians only on visits assigned to them. */
  'record:work': ['technician', 'office', 'lead', 'admin'],
  /** Record work on any visit, not just one's own. */
  'record:any-visit': ['office', 'lead', 'admin'],
  /** Edit customers, sites, units and detectors. */
  'edit:records': ['office', 'lead', 'admin'],
  /** Schedule, reschedule and assign visits. */
  'schedule:visits': ['office', 'lead', 'admin'],
  /** Acknowledge and assign from the triage queue. */
  'triage:fleet': ['lead', 'admin'],
  /** Bulk maintenance cycles and fleet-wide audits. */
  'run:bulk': ['lead', 'admin'],
  /** Read the audit log. */
  'view:audit': ['admin', 'lead', 'manager'],
  /** Receive the weekly digest. */
  'receive:digest': ['manager', 'lead', 'admin'],
  /** Invite users, change roles, deactivate. */
  'manage:users': ['admin'],
  /** Create and revoke API tokens. */
  'manage:tokens': ['admin'],
  /** Change application settings. */
  'manage:settings': ['admin'],
} as const satisfies Record<string, readonly Role[]>

export type Capability = keyof typeof PERMISSIONS

export function isRole(value: string): value is Role {
  return (ROLE_KEYS as readonly string[]).includes(value)
}

export function can(role: Role, capability: Capability): boolean {
  return (PERMISSIONS[capability] as readonly Role[]).includes(role)
}

export function capabilitiesOf(role: Role): Capability[] {
  return (Object.keys(PERMISSIONS) as Capability[]).filter((c) => can(role, c))
}

/**
 * What a route requires, declared in its `handle` so the route × role test can enumerate it:
 * 'public' needs nothing, 'signed-in' needs any active user, otherwise a capability.
 */
export type Access = 'public' | 'signed-in' | Capability
export interface RouteAccess {
  loader?: Access
  action?: Access
}

export function allows(role: Role | null, access: Access): boolean {
  if (access === 'public') return true
  if (role === null) return false
  return access === 'signed-in' || can(role, access)
}

/** Each capability as what a person does with it, to finish "The Office role cannot …". */
export const CAPABILITY_WORDS: Record<Capability, string> = {
  'view:fleet': 'read the customer, site and detector records',
  'record:work': 'record work on visits',
  'record:any-visit': 'record work on visits assigned to someone else',
  'edit:records': 'change customer, site, unit or detector records',
  'schedule:visits': 'book, move or assign visits',
  'triage:fleet': 'acknowledge or assign detectors from the triage queue',
  'run:bulk': 'make bulk changes across the fleet',
  'view:audit': 'read the audit log',
  'receive:digest': 'receive the weekly digest or change its settings',
  'manage:users': 'invite people, change their roles or deactivate them',
  'manage:tokens': 'create or revoke API tokens',
  'manage:settings': 'change the company calendar, the outbox or other settings',
}

/** Why a role is refused a capability, in one plain sentence. */
export function refusal(role: Role, capability: Capability): string {
  return `The ${ROLE_LABELS[role]} role cannot ${CAPABILITY_WORDS[capability]}.`
}
