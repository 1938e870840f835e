import { todayIn } from '~/domain/dates'

/**
 * The office's calendar day: due dates and the fleet's statuses are judged against it.
 * OFFICE_TODAY pins it (tests, and demos replayed on a given day).
 */
export function officeToday(now = new Date()): string {
  return process.env.OFFICE_TODAY ?? todayIn(process.env.OFFICE_TIME_ZONE ?? 'America/Chicago', now)
}
