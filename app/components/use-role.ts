import { useRouteLoaderData } from 'react-router'
import { isRole, type Role } from '~/domain/permissions'

/** The signed-in person's role, from the console layout's loader; null outside the console. */
export function useRole(): Role | null {
  const data = useRouteLoaderData('routes/_app') as { user?: { role?: string } } | undefined
  const role = data?.user?.role
  return role && isRole(role) ? role : null
}
