import type Database from 'better-sqlite3'
import { addDays, type IsoDate } from '~/domain/dates'
import { writeAuditRow, type AuditEntry } from '../audit'

interface DoneVisit {
  id: number
  siteId: number
  kind: string
  scheduledOn: IsoDate
  technicianId: number
  createdBy: number
  createdAt: string
  noticeId: number
  notifiedAt: string
  notifiedBy: number
  inTestFrom: string
  clearedAt: string
  clearedWith: string | null
}

/**
 * The audit entries the seeded history implies, for its last `days` days: each visit the office
 * booked, and for each visit done its notice to the monitoring company, its start, its completion
 * with every detector's result, and its all-clear, by the people the history names and at the times
 * it gives. Written oldest first (the log pages by id), in the shapes the visit routes write.
 * Older history keeps no entries: a bounded log keeps the seed fast at every scale.
 */
export function writeHistoryAudit(sqlite: Database.Database, today: IsoDate, days: number): number {
  if (days <= 0) return 0
  const from = addDays(today, -days)
  const since = `${from}T00:00:00.000Z`
  const visits = sqlite
    .prepare(
      `select v.id, v.site_id as siteId, v.kind, v.scheduled_on as scheduledOn, v.technician_id as technicianId,
              v.created_by as createdBy, v.created_at as createdAt,
              n.id as noticeId, n.notified_at as notifiedAt, n.notified_by as notifiedBy, n.in_test_from as inTestFrom,
              n.cleared_at as clearedAt, n.cleared_with as clearedWith
       from visits v join notifications n on n.visit_id = v.id
       where v.status = 'done' and v.scheduled_on >= ? and v.scheduled_on <= ?
       order by v.id`,
    )
    .all(from, today) as DoneVisit[]
  const itemsOf = sqlite.prepare('select detector_id as detectorId, tasks, result, completed_at as completedAt from visit_detectors where visit_id = ? order by detector_id')
  const outcomesOf = sqlite.prepare('select detector_id as detectorId, task, outcome from task_results where visit_id = ? order by detector_id, id')

  const entries: Array<AuditEntry & { at: string; order: number }> = []
  const add = (order: number, e: AuditEntry & { at: string }) => {
    if (e.at >= since) entries.push({ ...e, order })
  }
  for (const v of visits) {
    const items = itemsOf.all(v.id) as Array<{ detectorId: number; tasks: string; result: string; completedAt: string | null }>
    if (items.length === 0) continue
    const outcomes = new Map<number, Record<string, string>>()
    for (const o of outcomesOf.all(v.id) as Array<{ detectorId: number; task: string; outcome: string }>) {
      outcomes.set(o.detectorId, { ...outcomes.get(o.detectorId), [o.task]: o.outcome })
    }
    const completedAt = items.reduce((latest, i) => (i.completedAt && i.completedAt > latest ? i.completedAt : latest), v.inTestFrom)
    const visit = { entity: 'visit', entityId: v.id }
    add(0, {
      ...visit,
      at: v.createdAt,
      actorId: v.createdBy,
      action: 'visit.book',
      after: {
        siteId: v.siteId,
        kind: v.kind,
        scheduledOn: v.scheduledOn,
        window: [null, null],
        technicianId: v.technicianId,
        detectors: items.map((i) => ({ detectorId: i.detectorId, tasks: i.tasks.split(',') })),
      },
    })
    add(1, { ...visit, at: v.notifiedAt, actorId: v.notifiedBy, action: 'visit.notify', before: { status: 'planned' }, after: { status: 'notified', noticeId: v.noticeId } })
    // Work starts once the system is in test.
    add(2, { ...visit, at: v.inTestFrom, actorId: v.technicianId, action: 'visit.start', before: { status: 'notified' }, after: { status: 'in-progress', startedAt: v.inTestFrom } })
    add(3, {
      ...visit,
      at: completedAt,
      actorId: v.technicianId,
      action: 'visit.complete',
      before: { status: 'in-progress' },
      after: { status: 'done', completedAt, detectors: items.map((i) => ({ detectorId: i.detectorId, result: i.result, tasks: outcomes.get(i.detectorId) ?? {} })) },
    })
    add(4, {
      ...visit,
      at: v.clearedAt,
      actorId: v.technicianId,
      action: 'visit.all-clear',
      before: { clearedAt: null },
      after: { noticeId: v.noticeId, clearedAt: v.clearedAt, clearedWith: v.clearedWith },
    })
  }
  // Oldest first, so ids rise with time as they do when people write them.
  entries.sort((a, b) => (a.at < b.at ? -1 : a.at > b.at ? 1 : Number(a.entityId) - Number(b.entityId) || a.order - b.order))
  sqlite.transaction(() => {
    for (const { order: _order, ...e } of entries) writeAuditRow(sqlite, e)
  })()
  return entries.length
}
