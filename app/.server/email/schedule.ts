import { Cron } from 'croner'
import type { Db } from '../db'
import { officeToday } from '../today'
import { digestKey, digestRecipients, fleetFigures, type FleetFigures } from './digest'
import { queueDigest } from './digest-message'
import { sendDue } from './send'

const officeZone = () => process.env.OFFICE_TIME_ZONE ?? 'America/Chicago'

function officeHour(now: Date): number {
  const hour = new Intl.DateTimeFormat('en-GB', { timeZone: officeZone(), hour: '2-digit', hourCycle: 'h23' }).format(now)
  return Number(hour)
}

/** 1 = Monday … 7 = Sunday, of the office's calendar day. */
function weekdayOf(day: string): number {
  return new Date(`${day}T00:00:00Z`).getUTCDay() || 7
}

export interface DigestRun {
  today: string
  due: number
  queued: number
  already: number
  sent: number
}

/**
 * Queues this week's digest for each person whose day has come and whose hour has passed (so a server
 * that was down at the hour catches up), then sends what is due. The key digest:<user>:<ISO week> makes
 * the whole run safe to repeat, in this process or another at the same moment.
 */
export async function runDigests(db: Db, now = new Date()): Promise<DigestRun> {
  const today = officeToday(now)
  const weekday = weekdayOf(today)
  const hour = officeHour(now)
  const due = digestRecipients(db).filter((r) => r.enabled && r.weekday === weekday && r.hour <= hour)
  const exists = db.$client.prepare('select 1 from email_outbox where idempotency_key = ?').pluck()
  let queued = 0
  let already = 0
  // Counted once for the whole fleet, on the first digest that is not yet queued.
  let fleet: FleetFigures | undefined
  for (const r of due) {
    // Building a digest costs queries; skip it when this week's is already in the outbox.
    if (exists.get(digestKey(r.userId, today))) {
      already++
      continue
    }
    fleet ??= fleetFigures(db, today)
    if ((await queueDigest(db, r, today, fleet)).created) queued++
    else already++
  }
  const sent = await sendDue(db, now)
  return { today, due: due.length, queued, already, sent: sent.sent }
}

const globalCron = globalThis as unknown as { __ductkeeperDigestCron?: Cron; __ductkeeperOutboxCron?: Cron }

/** Hourly, on the office's clock, once per process; `protect` skips a tick while the last still runs. */
export function startDigestSchedule(db: () => Db) {
  if (globalCron.__ductkeeperDigestCron) return
  globalCron.__ductkeeperDigestCron = new Cron('0 * * * *', { timezone: officeZone(), protect: true, unref: true }, async () => {
    try {
      const run = await runDigests(db())
      if (run.queued || run.sent) console.log(`Weekly digests for ${run.today}: ${run.queued} queued, ${run.sent} sent`)
    } catch (error) {
      console.error('Sending weekly digests failed', error)
    }
  })
  // Retries and notices wait minutes, not an hour.
  globalCron.__ductkeeperOutboxCron = new Cron('30 * * * * *', { protect: true, unref: true }, async () => {
    try {
      await sendDue(db())
    } catch (error) {
      console.error('Sending queued e-mail failed', error)
    }
  })
}
