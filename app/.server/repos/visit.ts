import { noticeColumns } from './notice-columns'
import { asc, count, eq, inArray, sql } from 'drizzle-orm'
import { alias } from 'drizzle-orm/sqlite-core'
import type { Db } from '../db'
import { attachments, customers, detectors, emailOutbox, monitoringCompanies, notifications, readings, sites, units, users, visitDetectors, visits } from '../schema'
import { perDb } from './statements'

const DETECTORS_CAP = 500
const NOTIFICATIONS_CAP = 50
// Nine kinds of reading per detector, for the most detectors a visit lists.
const READINGS_CAP = 9 * DETECTORS_CAP
const ATTACHMENTS_CAP = 500

const id = sql.placeholder('id')
const detectorsOfVisit = eq(visitDetectors.visitId, id)
const notificationsOfVisit = eq(notifications.visitId, id)

const technician = alias(users, 'technician')
const creator = alias(users, 'creator')
const clearer = alias(users, 'clearer')
const uploader = alias(users, 'uploader')

const statements = perDb((db: Db) => ({
  visit: db
    .select({
      visit: {
        id: visits.id,
        kind: visits.kind,
        scheduledOn: visits.scheduledOn,
        windowFrom: visits.windowFrom,
        windowUntil: visits.windowUntil,
        status: visits.status,
        notes: visits.notes,
        startedAt: visits.startedAt,
        completedAt: visits.completedAt,
        cancelledAt: visits.cancelledAt,
        cancelReason: visits.cancelReason,
        version: visits.version,
        createdAt: visits.createdAt,
        createdBy: creator.name,
      },
      site: {
        id: sites.id,
        name: sites.name,
        street: sites.street,
        city: sites.city,
        region: sites.region,
        timeZone: sites.timeZone,
        accessNotes: sites.accessNotes,
        monitoringAccount: sites.monitoringAccount,
      },
      customer: { id: customers.id, name: customers.name },
      monitoring: {
        id: monitoringCompanies.id,
        name: monitoringCompanies.name,
        phone: monitoringCompanies.phone,
        email: monitoringCompanies.email,
        notifyMethod: monitoringCompanies.notifyMethod,
        notifyLeadMinutes: monitoringCompanies.notifyLeadMinutes,
      },
      technician: { id: technician.id, name: technician.name, email: technician.email },
    })
    .from(visits)
    .innerJoin(sites, eq(sites.id, visits.siteId))
    .innerJoin(customers, eq(customers.id, sites.customerId))
    .leftJoin(monitoringCompanies, eq(monitoringCompanies.id, sites.monitoringCompanyId))
    .leftJoin(technician, eq(technician.id, visits.technicianId))
    .leftJoin(creator, eq(creator.id, visits.createdBy))
    .where(eq(visits.id, id))
    .prepare(),
  detectors: db
    .select({
      id: detectors.id,
      tag: detectors.tag,
      unitId: detectors.unitId,
      unit: units.tag,
      position: detectors.position,
      state: detectors.state,
      due: detectors.dueStatus,
      nextDueOn: detectors.nextDueOn,
      risk: detectors.riskScore,
      tasks: visitDetectors.tasks,
      result: visitDetectors.result,
      resultReason: visitDetectors.resultReason,
      findings: visitDetectors.findings,
      notes: visitDetectors.notes,
      completedAt: visitDetectors.completedAt,
    })
    .from(visitDetectors)
    .innerJoin(detectors, eq(detectors.id, visitDetectors.detectorId))
    .innerJoin(units, eq(units.id, detectors.unitId))
    .where(detectorsOfVisit)
    .orderBy(asc(detectors.tag), asc(detectors.id))
    .limit(DETECTORS_CAP)
    .prepare(),
  detectorCount: db.select({ n: count() }).from(visitDetectors).where(detectorsOfVisit).prepare(),
  notifications: db
    .select({
      ...noticeColumns,
      notifiedBy: users.name,
      clearedWith: notifications.clearedWith,
      clearedBy: clearer.name,
    })
    .from(notifications)
    .leftJoin(users, eq(users.id, notifications.notifiedBy))
    .leftJoin(clearer, eq(clearer.id, notifications.clearedBy))
    .where(notificationsOfVisit)
    .orderBy(asc(notifications.notifiedAt), asc(notifications.id))
    .limit(NOTIFICATIONS_CAP)
    .prepare(),
  notificationCount: db.select({ n: count() }).from(notifications).where(notificationsOfVisit).prepare(),
  readings: db
    .select({ id: readings.id, detectorId: readings.detectorId, kind: readings.kind, value: readings.value, open: readings.open, takenAt: readings.takenAt })
    .from(readings)
    .where(eq(readings.visitId, id))
    .orderBy(asc(readings.detectorId), asc(readings.kind), asc(readings.id))
    .limit(READINGS_CAP)
    .prepare(),
  // The notice and all-clear sent by e-mail for this visit (at most one of each), with how they fared.
  emails: db
    .select({
      id: emailOutbox.id,
      kind: emailOutbox.kind,
      to: emailOutbox.toAddress,
      subject: emailOutbox.subject,
      status: emailOutbox.status,
      attempts: emailOutbox.attempts,
      error: emailOutbox.error,
      nextAttemptAt: emailOutbox.nextAttemptAt,
      providerId: emailOutbox.providerId,
      createdAt: emailOutbox.createdAt,
      sentAt: emailOutbox.sentAt,
    })
    .from(emailOutbox)
    // Found by their keys (notice:<visit>:<kind>), on the outbox's unique index.
    .where(inArray(emailOutbox.idempotencyKey, [sql.placeholder('noticeKey'), sql.placeholder('allClearKey')]))
    .orderBy(asc(emailOutbox.id))
    .prepare(),
  attachments: db
    .select({
      id: attachments.id,
      detectorId: attachments.detectorId,
      fileName: attachments.fileName,
      contentType: attachments.contentType,
      sizeBytes: attachments.sizeBytes,
      hasThumb: sql<boolean>`${attachments.thumbKey} is not null`.mapWith(Boolean),
      uploadedBy: uploader.name,
      uploadedAt: attachments.uploadedAt,
    })
    .from(attachments)
    .leftJoin(uploader, eq(uploader.id, attachments.uploadedBy))
    .where(eq(attachments.visitId, id))
    .orderBy(asc(attachments.uploadedAt), asc(attachments.id))
    .limit(ATTACHMENTS_CAP)
    .prepare(),
}))

/**
 * A visit as its page and `/api/visits/:id` show it: the visit (window, times, version), its site,
 * customer and monitoring company (how it wants to be told), the technician, the detectors on it with
 * their tasks and what was recorded for each, the notices given for it with their all-clear, the
 * e-mails sent for them, the readings taken at it and its attachments.
 */
export function visitRecord(db: Db, visitId: number, now = new Date()) {
  const s = statements(db)
  const head = s.visit.get({ id: visitId })
  if (!head) return null
  const at = { id: visitId }
  const notices = s.notifications.all(at)
  const latest = notices.at(-1) ?? null
  return {
    ...head,
    // Work still under way after the system was due back out of test: the monitoring company must
    // be called to extend the test, or the all-clear given.
    testWindowOverrun:
      head.visit.status === 'in-progress' && latest !== null && latest.clearedAt === null && Date.parse(latest.inTestUntil) < now.getTime(),
    detectors: {
      rows: s.detectors.all(at).map((d) => ({ ...d, tasks: d.tasks.split(',').filter(Boolean) })),
      total: s.detectorCount.get(at)!.n,
    },
    notifications: { rows: notices, total: s.notificationCount.get(at)!.n },
    readings: s.readings.all(at),
    emails: s.emails.all({ noticeKey: `notice:${visitId}:notice`, allClearKey: `notice:${visitId}:all-clear` }),
    attachments: s.attachments.all(at),
  }
}
