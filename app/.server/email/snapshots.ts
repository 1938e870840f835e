import { and, eq } from 'drizzle-orm'
import { z } from 'zod'
import { addDays } from '~/domain/dates'
import type { Db } from '../db'
import { digestSnapshots } from '../schema'
import { isoWeek, type DigestFigures } from './digest'

/** The figures a digest compares with the week before; kept per person and ISO week. */
const weekFigures = z.object({
  overdue: z.number().int().min(0),
  dueSoon: z.number().int().min(0),
  trouble: z.number().int().min(0),
  failedTests: z.number().int().min(0),
  failedDiagnoses: z.number().int().min(0),
  delayDisagree: z.number().int().min(0),
  visitsDone: z.number().int().min(0),
  visitsPlanned: z.number().int().min(0),
  notices: z.number().int().min(0),
})
export type WeekFigures = z.infer<typeof weekFigures>

export function weekFiguresOf(f: DigestFigures): WeekFigures {
  return {
    overdue: f.overdue.any,
    dueSoon: f.dueSoon.any,
    trouble: f.trouble.now,
    failedTests: f.failedTests.thisWeek,
    failedDiagnoses: f.failedDiagnoses.now,
    delayDisagree: f.delayDisagree,
    visitsDone: f.visitsDone.thisWeek,
    visitsPlanned: f.visitsPlanned,
    notices: f.notices.thisWeek,
  }
}

/**
 * What this person's digest said the ISO week before `today`'s, or null when none was sent that week
 * (a new recipient, a week switched off) or the stored figures are not in the expected shape.
 */
export function lastWeekFigures(db: Db, userId: number, today: string): WeekFigures | null {
  const row = db
    .select({ figures: digestSnapshots.figures })
    .from(digestSnapshots)
    .where(and(eq(digestSnapshots.userId, userId), eq(digestSnapshots.week, isoWeek(addDays(today, -7)))))
    .get()
  const parsed = weekFigures.safeParse(row?.figures)
  return parsed.success ? parsed.data : null
}

/** Keeps the figures of the digest queued for this week; the first one queued for a week stands. */
export function recordSnapshot(db: Db, userId: number, today: string, figures: WeekFigures): void {
  db.insert(digestSnapshots).values({ userId, week: isoWeek(today), figures }).onConflictDoNothing().run()
}
