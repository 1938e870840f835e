import { Link, useNavigate } from 'react-router'
import { can } from '~/domain/permissions'
import { useShortcut } from '../keyboard'
import { useRole } from '../use-role'

/** The way from a record's page to its edit form, with the `e` key; shown only to roles that may edit. */
export function EditLink({ to, what }: { to: string; what: string }) {
  const role = useRole()
  const navigate = useNavigate()
  const allowed = role !== null && can(role, 'edit:records')
  useShortcut('edit', () => void navigate(to), allowed)
  if (!allowed) return null
  return (
    <Link
      to={to}
      aria-keyshortcuts="e"
      className="inline-flex min-h-9 items-center gap-2 rounded-sm border border-line-strong bg-panel px-3 py-1 text-sm font-medium text-ink hover:bg-sunken"
    >
      Edit {what}
      <kbd className="rounded-sm border border-line px-1 font-mono text-xs text-ink-faint touch:hidden">e</kbd>
    </Link>
  )
}
