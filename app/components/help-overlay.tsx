import { useEffect, useState } from 'react'
import { shortcutsFor, showChord, type Shortcut } from '~/utils/shortcuts'
import { useShortcut } from './keyboard'
import { useRole } from './use-role'
import { Kbd } from './ui/command'

const GROUPS: Shortcut['group'][] = ['Anywhere', 'Lists', 'Go to']

/** Every shortcut, from the one list that also drives the keys and the palette. */
export function HelpOverlay({ allowed }: { allowed: (s: Shortcut) => boolean }) {
  const [open, setOpen] = useState(false)
  const shortcuts = shortcutsFor(useRole())
  useShortcut('help', () => setOpen((o) => !o))
  useShortcut('close', () => setOpen(false), open)
  useEffect(() => {
    const show = () => setOpen(true)
    window.addEventListener('dk:help', show)
    return () => window.removeEventListener('dk:help', show)
  }, [])
  if (!open) return null
  const mac = /Mac/.test(navigator.platform)
  return (
    <div className="fixed inset-0 z-40 grid place-items-center bg-ink/30 p-4" onClick={() => setOpen(false)}>
      <div
        role="dialog"
        aria-modal="true"
        aria-labelledby="help-h"
        className="max-h-[85vh] w-full max-w-2xl overflow-y-auto rounded-md border border-line-strong bg-panel p-5 shadow-2xl"
        onClick={(e) => e.stopPropagation()}
      >
        <div className="flex items-baseline justify-between">
          <h2 id="help-h" className="text-lg font-semibold">
            Keyboard shortcuts
          </h2>
          <button type="button" autoFocus onClick={() => setOpen(false)} className="text-sm text-ink-soft underline">
            Close<span className="touch:hidden"> (Esc)</span>
          </button>
        </div>
        <p className="mt-1 text-sm text-ink-soft">Shortcuts never fire while you type in a field; Esc leaves the field.</p>
        <div className="mt-4 grid gap-5 sm:grid-cols-2">
          {GROUPS.map((g) => (
            <section key={g} aria-label={g}>
              <h3 className="text-xs font-medium tracking-wide text-ink-faint uppercase">{g}</h3>
              <dl className="mt-2 space-y-1.5 text-sm">
                {shortcuts.filter((s) => s.group === g && allowed(s)).map((s) => (
                  <div key={s.id} className="flex items-center justify-between gap-3">
                    <dt>{s.label}</dt>
                    <dd className="flex shrink-0 gap-1">
                      {s.keys.map((k) => (
                        <Kbd key={k}>{showChord(k, mac)}</Kbd>
                      ))}
                    </dd>
                  </div>
                ))}
              </dl>
            </section>
          ))}
        </div>
      </div>
    </div>
  )
}
