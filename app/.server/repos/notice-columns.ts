import { notifications } from '../schema'

/** A logged notice as every record shows it; each query adds who logged it and what it joins. */
export const noticeColumns = {
  id: notifications.id,
  notifiedAt: notifications.notifiedAt,
  method: notifications.method,
  spokeWith: notifications.spokeWith,
  confirmation: notifications.confirmation,
  inTestFrom: notifications.inTestFrom,
  inTestUntil: notifications.inTestUntil,
  siteContactTold: notifications.siteContactTold,
  clearedAt: notifications.clearedAt,
}
