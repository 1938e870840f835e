import type { Browser } from 'playwright-core'
import { afterAll, beforeAll } from 'vitest'
import type { Scale } from '~/.server/seed/generate'
import { launchBrowser } from './browser'
import { startServer } from './server'
import { seededDb } from './temp-db'

export interface Running {
  server: Awaited<ReturnType<typeof startServer>>
  data: ReturnType<typeof seededDb>
  browser: Browser
}

/**
 * A seeded database, the built server on it and (optionally) Chromium, for the tests of one file:
 * made before them, torn down after. Read the fields inside tests, once the hooks have run.
 */
export function useSeededServer(scale: Scale = 'small', o: { browser?: boolean; timeoutMs?: number } = {}): Running {
  const running = {} as Running
  beforeAll(async () => {
    running.data = seededDb(scale)
    running.server = await startServer(running.data.path)
    if (o.browser) running.browser = await launchBrowser()
  }, o.timeoutMs)
  afterAll(async () => {
    await running.browser?.close()
    await running.server?.stop()
    running.data?.cleanup()
  })
  return running
}

export const DEMO_EMAIL = {
  admin: 'admin@ductkeeper.test',
  lead: 'lead@ductkeeper.test',
  office: 'office@ductkeeper.test',
  technician: 'tech@ductkeeper.test',
  manager: 'manager@ductkeeper.test',
} as const
