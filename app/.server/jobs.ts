import { getDb } from './db'
import { startDigestSchedule } from './email/schedule'
import { isOffloadWorker, warmOffload } from './offload'
import { refreshIfNewDay } from './refresh'

const globalJobs = globalThis as unknown as { __ductkeeperJobs?: NodeJS.Timeout }
const EVERY_MS = 10 * 60_000

/** Starts once per process: keeps the derived fleet columns true to the office's calendar day. */
export function startBackgroundJobs() {
  // The offload worker loads this same build; it runs jobs handed to it, never timers of its own.
  if (isOffloadWorker || globalJobs.__ductkeeperJobs) return
  if (process.env.DUCTKEEPER_JOBS === 'off') return warmOffload(3_000)
  const tick = async () => {
    try {
      const result = await refreshIfNewDay(getDb())
      if (result) console.log(`Stored facts derived for ${result.to} (${result.plan === 'fleet' ? 'whole fleet' : `day turn from ${result.from}`}): ${result.changed} of ${result.checked} detectors changed in ${result.ms} ms over ${result.turns} turns, the longest turn ${result.slowestTurnMs} ms (${result.slowestTurnCpuMs} ms of CPU)`)
    } catch (error) {
      console.error('Refreshing derived fleet fields failed', error)
    }
  }
  // After start-up, so the first request is not kept waiting (tests set a later start to watch it run).
  // The bulk worker loads once the start's refresh is done, so the two do not share the CPU.
  setTimeout(() => void tick().finally(() => warmOffload(0)), Number(process.env.REFRESH_START_DELAY_MS ?? 200)).unref()
  globalJobs.__ductkeeperJobs = setInterval(tick, EVERY_MS)
  globalJobs.__ductkeeperJobs.unref()
  startDigestSchedule(getDb)
}
