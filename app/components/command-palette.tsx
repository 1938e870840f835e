import { createContext, useCallback, useContext, useEffect, useId, useLayoutEffect, useMemo, useRef, useState } from 'react'
import { useNavigate } from 'react-router'
import { can } from '~/domain/permissions'
import type { Section } from '~/utils/sections'
import { keysFor, SHORTCUTS, showChord } from '~/utils/shortcuts'
import { useShortcut } from './keyboard'
import { CommandDialog, CommandEmpty, CommandGroup, CommandInput, CommandItem, CommandList, Kbd } from './ui/command'
import { useJson } from './use-json'
import { useRole } from './use-role'
import { addRecent, readRecent, type RecentItem } from '~/utils/recent'

export interface PaletteAction {
  id: string
  label: string
  run: () => void
}

// Pages publish what can be done on them (a list's export, its selection's actions); the palette
// lists those actions. Each publisher keeps its own entries, so one does not wipe out another's.
const ActionsContext = createContext<{ actions: PaletteAction[]; publish: (owner: string, a: PaletteAction[] | null) => void } | null>(null)

export function PaletteActionsProvider({ children }: { children: React.ReactNode }) {
  const [byOwner, setByOwner] = useState<ReadonlyMap<string, PaletteAction[]>>(new Map())
  const publish = useCallback((owner: string, a: PaletteAction[] | null) => {
    setByOwner((prev) => {
      const next = new Map(prev)
      if (a === null) next.delete(owner)
      else next.set(owner, a)
      return next
    })
  }, [])
  const value = useMemo(() => ({ actions: [...byOwner.values()].flat(), publish }), [byOwner, publish])
  return <ActionsContext.Provider value={value}>{children}</ActionsContext.Provider>
}

export function usePaletteActions(actions: PaletteAction[]) {
  const ctx = useContext(ActionsContext)
  const owner = useId()
  // Entries are republished only when their labels change, so each one runs the newest action of
  // its id: the selection or technician chosen since then, not the one seen at publish time.
  const latest = useRef(actions)
  useLayoutEffect(() => {
    latest.current = actions
  })
  const key = actions.map((a) => a.id + a.label).join('|')
  useEffect(() => {
    ctx?.publish(owner, actions.map((a) => ({ ...a, run: () => latest.current.find((x) => x.id === a.id)?.run() })))
    return () => ctx?.publish(owner, null)
    // eslint-disable-next-line react-hooks/exhaustive-deps
  }, [key])
}

interface SearchGroup {
  kind: 'customer' | 'site' | 'unit' | 'detector'
  items: Array<{ id: number; title: string; detail: string; href: string }>
}

const KIND_LABELS: Record<SearchGroup['kind'], string> = { customer: 'Customers', site: 'Sites', unit: 'Units', detector: 'Detectors' }

export function CommandPalette({ sections: offered }: { sections: Section[] }) {
  const role = useRole()
  // Only sections the role may open: the palette never leads to a refusal.
  const sections = role ? offered.filter((s) => can(role, s.capability)) : []
  const [open, setOpen] = useState(false)
  const [text, setText] = useState('')
  const [recent, setRecent] = useState<RecentItem[]>([])
  const navigate = useNavigate()
  const actions = useContext(ActionsContext)?.actions ?? []
  const q = text.trim()
  // Keep the last answer on screen while the next keystroke's answer is on its way.
  const { data, error, isLoading, retry } = useJson<{ groups: SearchGroup[] }>(open && q.length > 0 ? `/api/search?q=${encodeURIComponent(q)}` : null, {
    keepPreviousData: true,
    dedupingInterval: 2_000,
  })

  // Opening reads the recent list afresh; closing clears the text for next time.
  const toggle = (next: boolean) => {
    if (next) setRecent(readRecent())
    else setText('')
    setOpen(next)
  }
  useShortcut('palette', () => toggle(!open))

  // Close first, then act, so focus lands on the page the command leads to.
  const run = (fn: () => void) => {
    setOpen(false)
    fn()
  }
  const go = (item: RecentItem) =>
    run(() => {
      addRecent(item)
      navigate(item.href)
    })
  const matches = (label: string) => !q || label.toLowerCase().includes(q.toLowerCase())
  // The highlighted entry is held here: results arrive after the keystroke, and the first of them
  // should be the one Enter opens.
  const [highlight, setHighlight] = useState('')
  const values = [
    ...(q && error ? ['retry-search'] : []),
    ...actions.filter((a) => matches(a.label)).map((a) => `action:${a.id}`),
    ...(q ? (data?.groups ?? []).flatMap((g) => g.items.map((i) => i.href)) : recent.map((r) => `recent:${r.href}`)),
    ...sections.filter((s) => matches(s.label)).map((s) => `section:${s.to}`),
  ]
  const firstValue = values[0] ?? ''
  const known = values.join('|')
  // A new set of entries highlights its first: adjusted while rendering, not in an effect after it.
  const [highlightFor, setHighlightFor] = useState(known)
  if (highlightFor !== known) {
    setHighlightFor(known)
    setHighlight(firstValue)
  }
  const goShortcut = (to: string) => keysFor(`go:${to}`)[0]
  const mac = typeof navigator !== 'undefined' && /Mac/.test(navigator.platform)

  return (
    <CommandDialog open={open} onOpenChange={toggle} label="Command palette" value={highlight} onValueChange={setHighlight}>
      <CommandInput value={text} onValueChange={setText} placeholder="Go to, find a customer, site, unit or detector, or run an action…" />
      <CommandList>
        {q.length > 0 && error && (
          <div role="alert" className="flex items-center justify-between gap-2 border-b border-line px-3 py-2 text-sm">
            <span>Search failed: {error.message}</span>
            <CommandItem value="retry-search" onSelect={() => void retry()}>
              Try again
            </CommandItem>
          </div>
        )}
        <CommandEmpty>{isLoading ? 'Searching…' : 'Nothing matches.'}</CommandEmpty>
        {actions.filter((a) => matches(a.label)).length > 0 && (
          <CommandGroup heading="Selection">
            {actions
              .filter((a) => matches(a.label))
              .map((a) => (
                <CommandItem key={a.id} value={`action:${a.id}`} onSelect={() => run(a.run)}>
                  {a.label}
                </CommandItem>
              ))}
          </CommandGroup>
        )}
        {q.length > 0 &&
          data?.groups
            .filter((g) => g.items.length > 0)
            .map((g) => (
              <CommandGroup key={g.kind} heading={KIND_LABELS[g.kind]}>
                {g.items.map((item) => (
                  <CommandItem key={item.href} value={item.href} onSelect={() => go({ href: item.href, title: item.title, kind: g.kind })}>
                    <span className="min-w-0 truncate">
                      <span className={g.kind === 'detector' || g.kind === 'unit' ? 'font-mono' : 'font-medium'}>{item.title}</span>
                      <span className="ml-2 text-xs text-ink-faint">{item.detail}</span>
                    </span>
                  </CommandItem>
                ))}
              </CommandGroup>
            ))}
        {!q && recent.length > 0 && (
          <CommandGroup heading="Recent">
            {recent.map((item) => (
              <CommandItem key={item.href} value={`recent:${item.href}`} onSelect={() => go(item)}>
                <span className="truncate">{item.title}</span>
                <span className="text-xs text-ink-faint capitalize">{item.kind}</span>
              </CommandItem>
            ))}
          </CommandGroup>
        )}
        {sections.filter((s) => matches(s.label)).length > 0 && (
          <CommandGroup heading="Go to">
            {sections
              .filter((s) => matches(s.label))
              .map((s) => (
                <CommandItem key={s.to} value={`section:${s.to}`} onSelect={() => run(() => navigate(s.to))}>
                  {s.label}
                  {goShortcut(s.to) && <Kbd>{showChord(goShortcut(s.to), mac)}</Kbd>}
                </CommandItem>
              ))}
          </CommandGroup>
        )}
        {SHORTCUTS.filter((s) => s.group !== 'Go to' && matches(s.label)).length > 0 && (
          // Keys mean nothing on a touch screen with no keyboard.
          <div className="touch:hidden">
            <CommandGroup heading="Keys">
              {SHORTCUTS.filter((s) => s.group !== 'Go to' && matches(s.label)).map((s) => (
                <CommandItem key={s.id} value={`key:${s.id}`} onSelect={() => run(() => window.dispatchEvent(new CustomEvent('dk:help')))}>
                  <span>{s.label}</span>
                  <Kbd>{s.keys.map((k) => showChord(k, mac)).join(' / ')}</Kbd>
                </CommandItem>
              ))}
            </CommandGroup>
          </div>
        )}
      </CommandList>
    </CommandDialog>
  )
}
