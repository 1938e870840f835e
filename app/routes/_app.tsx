import { Outlet } from 'react-router'
import { requireUser } from '~/.server/auth'
import { can, ROLE_LABELS, type RouteAccess } from '~/domain/permissions'
import { CommandPalette, PaletteActionsProvider } from '~/components/command-palette'
import { HelpOverlay } from '~/components/help-overlay'
import { KeyboardProvider } from '~/components/keyboard'
import { SectionNav } from '~/components/section-nav'
import { SECTIONS } from '~/utils/sections'
import type { Route } from './+types/_app'

export const handle = { access: { loader: 'signed-in' } satisfies RouteAccess }

export async function loader({ request }: Route.LoaderArgs) {
  const user = await requireUser(request, 'signed-in')
  return {
    user: { name: user.name, email: user.email, role: user.role, roleLabel: ROLE_LABELS[user.role] },
    sections: SECTIONS.filter((s) => can(user.role, s.capability)),
  }
}

export default function AppLayout({ loaderData }: Route.ComponentProps) {
  const { user, sections } = loaderData
  const allowed = new Set(sections.map((s) => `go:${s.to}`))
  return (
    <KeyboardProvider>
      <PaletteActionsProvider>
    <div className="min-h-dvh md:grid md:grid-cols-[13rem_1fr]">
      <SectionNav sections={sections} user={user} />
      <main className="min-w-0 px-4 py-6 md:px-8 md:py-8">
        <Outlet />
      </main>
    </div>
        <CommandPalette sections={sections} />
        <HelpOverlay allowed={(s) => s.group !== 'Go to' || allowed.has(s.id)} />
      </PaletteActionsProvider>
    </KeyboardProvider>
  )
}
