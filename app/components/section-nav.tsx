import { useState } from 'react'
import { Form, NavLink, useLocation } from 'react-router'
import type { Section } from '~/utils/sections'
import { useShortcut } from './keyboard'
import { Kbd } from './ui/command'

const openPalette = () => window.dispatchEvent(new KeyboardEvent('keydown', { key: 'k', ctrlKey: true }))

/**
 * The console's rail. At desk width it stands on the left with every section; on a phone it folds
 * into a bar with a Menu button whose panel lists the same sections, the person and Sign out.
 */
export function SectionNav({ sections, user }: { sections: Section[]; user: { name: string; roleLabel: string } }) {
  const { pathname } = useLocation()
  // The menu stays open only on the page it was opened on: choosing a section folds it away again.
  const [openOn, setOpenOn] = useState<string | null>(null)
  const open = openOn === pathname
  const setOpen = (next: boolean) => setOpenOn(next ? pathname : null)
  useShortcut('close', () => setOpen(false), open)
  const main = sections.filter((s) => !s.group)
  const admin = sections.filter((s) => s.group === 'admin')
  const current = sections.find((s) => pathname === s.to || pathname.startsWith(`${s.to}/`))
  // Hidden below md unless opened; always shown from md up.
  const folded = open ? '' : 'hidden md:block'

  return (
    <header className="bg-rail text-rail-ink md:sticky md:top-0 md:flex md:h-dvh md:flex-col md:overflow-y-auto">
      <div className="px-4 py-1.5 md:block md:px-5 md:py-6">
        <div className="flex items-center justify-between gap-2">
          <a href="/" className="flex min-h-11 items-center gap-2 font-semibold tracking-tight text-white md:min-h-0">
            <Mark />
            <span className="text-lg">Ductkeeper</span>
          </a>
          <div className="flex items-center gap-2 md:hidden">
            <button
              type="button"
              onClick={openPalette}
              className="flex min-h-11 min-w-11 items-center justify-center gap-1.5 rounded-sm border border-white/15 px-3 text-sm text-white hover:bg-white/6"
            >
              <SearchGlyph />
              Find
            </button>
            <button
              type="button"
              aria-expanded={open}
              aria-controls="section-menu"
              onClick={() => setOpen(!open)}
              className="flex min-h-11 items-center gap-1.5 rounded-sm border border-white/15 px-3 text-sm text-white hover:bg-white/6"
            >
              <span aria-hidden="true" className="font-mono">
                {open ? '×' : '≡'}
              </span>
              Menu
              {current && !open && <span className="sr-only">(now: {current.label})</span>}
            </button>
          </div>
        </div>
        <button
          type="button"
          onClick={openPalette}
          className="mt-6 hidden w-full items-center justify-between gap-2 rounded-sm border border-white/15 px-2.5 py-1.5 text-left text-xs text-rail-ink/80 hover:bg-white/6 md:flex"
        >
          Find or jump… <Kbd>Ctrl K</Kbd>
        </button>
        <div id="section-menu" className={folded}>
          <nav aria-label="Sections" className="mt-2 flex flex-col gap-1 pb-2 md:mt-4 md:pb-0">
            <NavItems items={main} />
            {admin.length > 0 && (
              <>
                <div className="px-3 pt-4 pb-1 text-[0.7rem] font-medium tracking-wide text-rail-ink/60 uppercase md:pt-5">Administration</div>
                <NavItems items={admin} />
              </>
            )}
          </nav>
        </div>
      </div>
      <div className={`${open ? 'flex' : 'hidden md:block'} items-center justify-between gap-3 border-t border-white/10 px-4 py-2 md:mt-auto md:px-5 md:py-4`}>
        <div className="min-w-0 text-sm">
          <div className="truncate font-medium text-white">{user.name}</div>
          <div className="text-xs text-rail-ink/70">{user.roleLabel}</div>
        </div>
        <Form method="post" action="/sign-out" className="md:mt-3">
          <button type="submit" className="min-h-11 rounded-sm border border-white/20 px-3 text-sm text-white hover:bg-white/10 md:min-h-0 md:px-2.5 md:py-1 md:text-xs">
            Sign out
          </button>
        </Form>
      </div>
    </header>
  )
}

function NavItems({ items }: { items: Section[] }) {
  return items.map((s) => (
    <NavLink
      key={s.to}
      to={s.to}
      className={({ isActive }) =>
        `flex min-h-11 items-center rounded-sm px-3 text-base whitespace-nowrap md:block md:min-h-0 md:py-1.5 md:text-sm ${
          isActive ? 'bg-white/12 font-medium text-white' : 'text-rail-ink/80 hover:bg-white/6 hover:text-white'
        }`
      }
    >
      {s.label}
    </NavLink>
  ))
}

function SearchGlyph() {
  return (
    <svg viewBox="0 0 16 16" className="size-4" aria-hidden="true">
      <circle cx="7" cy="7" r="4.5" fill="none" stroke="currentColor" strokeWidth="1.6" />
      <path d="M10.5 10.5 14 14" stroke="currentColor" strokeWidth="1.6" strokeLinecap="round" />
    </svg>
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
