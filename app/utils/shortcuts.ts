import type { Role } from '~/domain/permissions'
import { SECTIONS, sectionsFor } from './sections'

// Every keyboard shortcut, declared once: the key handler, the help overlay and the palette read it.
export type ShortcutId =
  | 'palette'
  | 'help'
  | 'focus-filter'
  | 'row-down'
  | 'row-up'
  | 'extend-down'
  | 'extend-up'
  | 'toggle-select'
  | 'open'
  | 'close'
  | 'edit'
  | `go:${string}`

export interface Shortcut {
  id: ShortcutId
  /** Chords as typed: 'mod+k' (Ctrl or ⌘), 'shift+j', 'g o' (g, then o). */
  keys: string[]
  label: string
  group: 'Anywhere' | 'Lists' | 'Go to'
}

export const SHORTCUTS: Shortcut[] = [
  { id: 'palette', keys: ['mod+k'], label: 'Open the command palette', group: 'Anywhere' },
  { id: 'help', keys: ['?'], label: 'Show every shortcut', group: 'Anywhere' },
  { id: 'close', keys: ['Escape'], label: 'Close, or clear the selection', group: 'Anywhere' },
  { id: 'edit', keys: ['e'], label: 'Edit the record on the page', group: 'Anywhere' },
  { id: 'focus-filter', keys: ['/'], label: 'Focus the filter', group: 'Lists' },
  { id: 'row-down', keys: ['j', 'ArrowDown'], label: 'Move to the next row', group: 'Lists' },
  { id: 'row-up', keys: ['k', 'ArrowUp'], label: 'Move to the previous row', group: 'Lists' },
  { id: 'toggle-select', keys: ['x'], label: 'Select or unselect the row', group: 'Lists' },
  { id: 'extend-down', keys: ['shift+j', 'shift+ArrowDown'], label: 'Extend the selection down', group: 'Lists' },
  { id: 'extend-up', keys: ['shift+k', 'shift+ArrowUp'], label: 'Extend the selection up', group: 'Lists' },
  { id: 'open', keys: ['Enter'], label: 'Open the row', group: 'Lists' },
  ...SECTIONS.map((s): Shortcut => ({ id: `go:${s.to}`, keys: [`g ${s.key}`], label: `Go to ${s.label}`, group: 'Go to' })),
]

/** The shortcuts a role can use: `g` keys only for the sections it may open. */
export function shortcutsFor(role: Role | null): Shortcut[] {
  const open = new Set((role ? sectionsFor(role) : []).map((s) => `go:${s.to}`))
  return SHORTCUTS.filter((s) => s.group !== 'Go to' || open.has(s.id))
}

/** The chord a key event stands for, in the notation above. */
export function chordOf(e: Pick<KeyboardEvent, 'key' | 'ctrlKey' | 'metaKey' | 'shiftKey' | 'altKey'>): string {
  const key = e.key.length === 1 ? e.key.toLowerCase() : e.key
  // '?' already needs shift on most layouts: name it by its character alone.
  if (e.key === '?') return '?'
  const mods = [(e.ctrlKey || e.metaKey) && 'mod', e.altKey && 'alt', e.shiftKey && key !== 'Shift' && 'shift'].filter(Boolean)
  return [...mods, key].join('+')
}

export function keysFor(id: ShortcutId): string[] {
  return SHORTCUTS.find((s) => s.id === id)?.keys ?? []
}

/** How a chord is shown to people: 'mod+k' → 'Ctrl K', 'g o' → 'g then o'. */
export function showChord(chord: string, mac = false): string {
  return chord
    .split(' ')
    .map((part) =>
      part
        .split('+')
        .map((k) => ({ mod: mac ? '⌘' : 'Ctrl', shift: 'Shift', alt: 'Alt', ArrowDown: '↓', ArrowUp: '↑', Escape: 'Esc', Enter: 'Enter' })[k] ?? k)
        .join(' '),
    )
    .join(' then ')
}
