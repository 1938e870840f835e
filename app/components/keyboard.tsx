import { createContext, useCallback, useContext, useEffect, useLayoutEffect, useMemo, useRef } from 'react'
import { useNavigate } from 'react-router'
import { chordOf, SHORTCUTS, shortcutsFor, type ShortcutId } from '~/utils/shortcuts'
import { useRole } from './use-role'

type Handler = (e: KeyboardEvent) => void
interface Registry {
  register: (id: ShortcutId, handler: Handler) => () => void
}

const KeyboardContext = createContext<Registry | null>(null)

// Only places that take typed text count as fields; a focused checkbox or button does not.
const editable = (t: EventTarget | null) =>
  t instanceof HTMLElement &&
  (t.isContentEditable || t.matches('input:not([type=checkbox],[type=radio],[type=button],[type=submit],[type=reset]), textarea, select'))
// Enter on a focused control is that control's own (a button presses, a link follows).
const activates = (t: EventTarget | null) => t instanceof HTMLElement && t.closest('button, a[href], summary, [role=button], input') !== null

// Sequences (g then a letter) wait this long for their second key.
const SEQUENCE_MS = 1200

/**
 * One key listener for the console. Pages register handlers for shortcut ids; the newest handler
 * for an id wins, so a dialog can take Escape from the list beneath it.
 */
export function KeyboardProvider({ children }: { children: React.ReactNode }) {
  const handlers = useRef(new Map<ShortcutId, Handler[]>())
  const pending = useRef<{ first: string; at: number } | null>(null)
  const navigate = useNavigate()
  // `g` then a letter leads only to sections the role may open; the others' keys do nothing.
  const role = useRole()
  const usable = useRef(new Set<ShortcutId>())
  const forRole = useMemo(() => new Set(shortcutsFor(role).map((s) => s.id)), [role])
  useLayoutEffect(() => {
    usable.current = forRole
  }, [forRole])

  const register = useCallback((id: ShortcutId, handler: Handler) => {
    const list = handlers.current.get(id) ?? []
    handlers.current.set(id, [...list, handler])
    return () => handlers.current.set(id, (handlers.current.get(id) ?? []).filter((h) => h !== handler))
  }, [])

  useEffect(() => {
    function onKey(e: KeyboardEvent) {
      if (e.defaultPrevented || e.isComposing) return
      const chord = chordOf(e)
      const inField = editable(e.target)
      // While typing, only the palette chord and Escape act; everything else is text.
      if (inField && chord !== 'mod+k' && chord !== 'Escape') return
      if (chord === 'Enter' && activates(e.target)) return
      let typed = chord
      if (pending.current && Date.now() - pending.current.at < SEQUENCE_MS) {
        typed = `${pending.current.first} ${chord}`
        pending.current = null
      } else if (chord === 'g') {
        pending.current = { first: 'g', at: Date.now() }
        return
      }
      const shortcut = SHORTCUTS.find((s) => s.keys.includes(typed))
      if (!shortcut || !usable.current.has(shortcut.id)) return
      const list = handlers.current.get(shortcut.id)
      const handler = list?.[list.length - 1]
      if (handler) {
        e.preventDefault()
        handler(e)
      } else if (shortcut.id.startsWith('go:')) {
        e.preventDefault()
        navigate(shortcut.id.slice(3))
      }
    }
    window.addEventListener('keydown', onKey)
    return () => window.removeEventListener('keydown', onKey)
  }, [navigate])

  const value = useMemo(() => ({ register }), [register])
  return <KeyboardContext.Provider value={value}>{children}</KeyboardContext.Provider>
}

/** Binds a handler to a shortcut while the component is mounted (and `enabled`). */
export function useShortcut(id: ShortcutId, handler: Handler, enabled = true) {
  const registry = useContext(KeyboardContext)
  const latest = useRef(handler)
  useLayoutEffect(() => {
    latest.current = handler
  })
  useEffect(() => {
    if (!registry || !enabled) return
    return registry.register(id, (e) => latest.current(e))
  }, [registry, id, enabled])
}
