import { Outlet, useRouteLoaderData } from 'react-router'
import { requireUser } from '~/.server/auth'
import { can, ROLE_LABELS, type RouteAccess } from '~/domain/permissions'
import { CommandPalette, PaletteActionsProvider } from '~/components/command-palette'
import { ErrorMessage } from '~/components/error-message'
import { HelpOverlay } from '~/components/help-overlay'
import { KeyboardProvider } from '~/components/keyboard'
import { SectionNav } from '~/components/section-nav'
import { homeFor, SECTIONS } from '~/utils/sections'
import type { Route } from './+types/_app'

export const handle = { access: { loader: 'signed-in' } satisfies RouteAccess }

export async function loader({ request }: Route.LoaderArgs) {
  const user = await requireUser(request, 'signed-in')
  const sections = SECTIONS.filter((s) => can(user.role, s.capability))
  const homePath = homeFor(can(user.role, 'triage:fleet') || can(user.role, 'schedule:visits'), can(user.role, 'record:work'))
  return {
    user: { name: user.name, email: user.email, role: user.role, roleLabel: ROLE_LABELS[user.role] },
    sections,
    home: { to: homePath, label: sections.find((s) => s.to === homePath)?.label ?? 'Overview' },
  }
}

type Layout = Awaited<ReturnType<typeof loader>>

function Shell({ data, children }: { data: Layout; children: React.ReactNode }) {
  const { user, sections } = data
  const allowed = new Set(sections.map((s) => `go:${s.to}`))
  return (
    <KeyboardProvider>
      <PaletteActionsProvider>
        <div className="min-h-dvh md:grid md:grid-cols-[13rem_1fr]">
          <SectionNav sections={sections} user={user} />
          <main className="min-w-0 px-4 py-6 md:px-8 md:py-8">{children}</main>
        </div>
        <CommandPalette sections={sections} />
        <HelpOverlay allowed={(s) => s.group !== 'Go to' || allowed.has(s.id)} />
      </PaletteActionsProvider>
    </KeyboardProvider>
  )
}

export default function AppLayout({ loaderData }: Route.ComponentProps) {
  return (
    <Shell data={loaderData}>
      <Outlet />
    </Shell>
  )
}

/**
 * A page inside the console that failed or was refused (a role opening what it may not, a record
 * that is gone) still stands in the console, menu and all, with a way back to the person's home.
 * When the layout's own loader failed there is no person to build the menu for: the bare message.
 */
export function ErrorBoundary({ error }: Route.ErrorBoundaryProps) {
  const data = useRouteLoaderData<typeof loader>('routes/_app')
  if (!data) {
    return (
      <main className="mx-auto max-w-xl p-10">
        <ErrorMessage error={error} back={{ to: '/', label: 'Back to the overview' }} />
      </main>
    )
  }
  return (
    <Shell data={data}>
      <ErrorMessage error={error} back={{ to: data.home.to, label: `Back to ${data.home.label}` }} />
    </Shell>
  )
}
