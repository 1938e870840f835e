import { Form, NavLink, Outlet } from 'react-router'
import { requireUser } from '~/.server/auth'
import { can, ROLE_LABELS, type RouteAccess } from '~/domain/permissions'
import { CommandPalette, PaletteActionsProvider } from '~/components/command-palette'
import { HelpOverlay } from '~/components/help-overlay'
import { KeyboardProvider } from '~/components/keyboard'
import { Kbd } from '~/components/ui/command'
import { SECTIONS, type Section } from '~/utils/sections'
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
  const main = sections.filter((s) => !s.group)
  const admin = sections.filter((s) => s.group === 'admin')
  const allowed = new Set(sections.map((s) => `go:${s.to}`))
  return (
    <KeyboardProvider>
      <PaletteActionsProvider>
    <div className="min-h-dvh md:grid md:grid-cols-[13rem_1fr]">
      <header className="bg-rail text-rail-ink md:sticky md:top-0 md:flex md:h-dvh md:flex-col md:overflow-y-auto">
        <div className="flex flex-wrap items-center gap-x-4 gap-y-2 px-4 py-3 md:block md:px-5 md:py-6">
          <a href="/" className="flex items-center gap-2 font-semibold tracking-tight text-white">
            <Mark />
            <span className="text-lg">Ductkeeper</span>
          </a>
          <button
            type="button"
            onClick={() => window.dispatchEvent(new KeyboardEvent('keydown', { key: 'k', ctrlKey: true }))}
            className="mt-0 flex items-center justify-between gap-2 rounded-sm border border-white/15 px-2.5 py-1.5 text-left text-xs text-rail-ink/80 hover:bg-white/6 md:mt-6 md:w-full"
          >
            Find or jump… <Kbd>Ctrl K</Kbd>
          </button>
          <nav aria-label="Sections" className="flex gap-1 overflow-x-auto md:mt-4 md:flex-col">
            <NavItems items={main} />
            {admin.length > 0 && (
              <>
                <div className="hidden px-3 pt-5 pb-1 text-[0.7rem] font-medium tracking-wide text-rail-ink/60 uppercase md:block">
                  Administration
                </div>
                <NavItems items={admin} />
              </>
            )}
          </nav>
        </div>
        <div className="flex items-center justify-between gap-3 border-t border-white/10 px-4 py-2 md:mt-auto md:block md:px-5 md:py-4">
          <div className="min-w-0 text-sm">
            <div className="truncate font-medium text-white">{user.name}</div>
            <div className="text-xs text-rail-ink/70">{user.roleLabel}</div>
          </div>
          <Form method="post" action="/sign-out" className="md:mt-3">
            <button type="submit" className="rounded-sm border border-white/20 px-2.5 py-1 text-xs text-white hover:bg-white/10">
              Sign out
            </button>
          </Form>
        </div>
      </header>
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

function NavItems({ items }: { items: Section[] }) {
  return items.map((s) => (
    <NavLink
      key={s.to}
      to={s.to}
      
      className={({ isActive }) =>
        `rounded-sm px-3 py-1.5 text-sm whitespace-nowrap ${
          isActive ? 'bg-white/12 font-medium text-white' : 'text-rail-ink/80 hover:bg-white/6 hover:text-white'
        }`
      }
    >
      {s.label}
    </NavLink>
  ))
}

function Mark() {
  return (
    <svg viewBox="0 0 32 32" className="size-6" aria-hidden="true">
      <rect width="32" height="32" rx="6" fill="#0e5a55" />
      <path d="M7 11h18v10H7z" fill="none" stroke="#d6e4e1" strokeWidth="2.4" />
      <circle cx="16" cy="16" r="3" fill="#e0a030" />
    </svg>
  )
}
