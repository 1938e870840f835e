import { NavLink, Outlet } from 'react-router'
import { SECTIONS } from '~/utils/sections'

export default function AppLayout() {
  return (
    <div className="min-h-dvh md:grid md:grid-cols-[13rem_1fr]">
      <header className="bg-rail text-rail-ink md:sticky md:top-0 md:h-dvh md:overflow-y-auto">
        <div className="flex items-center gap-4 px-4 py-3 md:block md:px-5 md:py-6">
          <a href="/" className="flex items-center gap-2 font-semibold tracking-tight text-white">
            <Mark />
            <span className="text-lg">Ductkeeper</span>
          </a>
          <nav aria-label="Sections" className="flex gap-1 overflow-x-auto md:mt-8 md:flex-col">
            {SECTIONS.map((s) => (
              <NavLink
                key={s.to}
                to={s.to}
                end={s.to === '/'}
                className={({ isActive }) =>
                  `rounded-sm px-3 py-1.5 text-sm whitespace-nowrap ${
                    isActive ? 'bg-white/12 font-medium text-white' : 'text-rail-ink/80 hover:bg-white/6 hover:text-white'
                  }`
                }
              >
                {s.label}
              </NavLink>
            ))}
          </nav>
        </div>
      </header>
      <main className="min-w-0 px-4 py-6 md:px-8 md:py-8">
        <Outlet />
      </main>
    </div>
  )
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
