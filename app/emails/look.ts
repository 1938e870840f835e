// The console's colours (app/app.css) for e-mail; fonts fall back to the system's where Inter is not installed.
export const C = { paper: '#f5f4ef', panel: '#ffffff', line: '#d9d7ce', ink: '#1b2527', soft: '#4a5557', faint: '#737c7d', accent: '#0e5a55', caution: '#8a4b00', cautionSoft: '#fbf0dc' }
export const FONT = "'Inter', 'Segoe UI', Helvetica, Arial, sans-serif"

/** Dark-mode overrides by class; inline styles carry the light look for clients that ignore <style>. */
export const DARK_CSS = `@media (prefers-color-scheme: dark) { .dk-body { background:#11191a !important; } .dk-card { background:#1b2527 !important; border-color:#37464a !important; } .dk-ink { color:#e8ecea !important; } .dk-soft { color:#b9c4c2 !important; } .dk-link { color:#7fc8bf !important; } .dk-caution { background:#3a2a12 !important; color:#f3d9a8 !important; } }`
