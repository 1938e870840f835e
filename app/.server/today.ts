import { todayIn } from '~/domain/dates'

/** The office's calendar day: due dates and the fleet's statuses are judged against it. */
export function officeToday(now = new Date()): string {
  return todayIn(process.env.OFFICE_TIME_ZONE ?? 'America/Chicago', now)
}
