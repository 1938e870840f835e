import { can, type Role } from '~/domain/permissions'
import type { DetectorEntry, VisitIntent } from '~/domain/visit-forms'
import type { VisitTask } from '~/domain/vocabulary'
import { writeAudit } from '../audit'
import { writeTx, type Db } from '../db'
import { rederive } from '../derivation'
import { enqueue, requeueFailed, type NewMessage } from '../email/send'
import { listsChanged } from '../list-query'
import { checkTechnician, checkWindow, checkWorkingDay } from './book'
import { entryFromRow, eventDetail, eventKind, findingsOf, taskOutcomes } from './outcomes'
import { entryRefusals, fieldChecks, tasksWithStation } from '~/domain/field-checks'
import { VisitRefusal } from './refusal'

export interface Actor {
  id: number
  role: Role
}

interface VisitRow {
  id: number
  siteId: number
  status: 'planned' | 'notified' | 'in-progress' | 'done' | 'cancelled'
  technicianId: number | null
  version: number
  kind: string
  notes: string | null
  scheduledOn: string
  windowFrom: string | null
  windowUntil: string | null
  siteName: string
  region: string
  companyId: number | null
  company: string | null
}

interface ItemRow {
  detectorId: number
  tag: string
  testStation: 'none' | 'key' | 'magnet'
  headsFitted: number
  tasks: string
  result: string
  resultReason: string | null
  notes: string | null
  findings: string | null
}

// Work on the visit itself is the technician's (their own visits) or the office's; changing the
// booking is scheduling.
const FIELD_INTENTS = new Set<VisitIntent['intent']>(['notify', 'start', 'record', 'complete', 'all-clear', 'email-notice', 'email-all-clear', 'retry-email'])

/** The outbox key of a visit's e-mail to its monitoring company: each kind goes once per visit. */
export const visitEmailKey = (visitId: number, kind: 'notice' | 'all-clear') => `notice:${visitId}:${kind}`

/** How a notice or all-clear sent through the outbox names its message on the visit's log. */
export const messageRef = (outboxId: number) => `e-mail message ${outboxId}`

function loadVisit(db: Db, visitId: number): VisitRow {
  const row = db.$client
    .prepare(
      `select v.id, v.site_id as siteId, v.status, v.technician_id as technicianId, v.version, v.kind, v.notes, v.scheduled_on as scheduledOn,
              v.window_from as windowFrom, v.window_until as windowUntil, s.name as siteName, s.region,
              m.id as companyId, m.name as company
       from visits v join sites s on s.id = v.site_id left join monitoring_companies m on m.id = s.monitoring_company_id
       where v.id = ?`,
    )
    .get(visitId) as VisitRow | undefined
  if (!row) throw new VisitRefusal(404, 'No such visit.')
  return row
}

function items(db: Db, visitId: number): ItemRow[] {
  return db.$client
    .prepare(
      `select vd.detector_id as detectorId, d.tag, d.test_station as testStation, d.heads_fitted as headsFitted, vd.tasks, vd.result,
              vd.result_reason as resultReason, vd.notes, vd.findings
       from visit_detectors vd join detectors d on d.id = vd.detector_id where vd.visit_id = ? order by d.tag, d.id`,
    )
    .all(visitId) as ItemRow[]
}

function checkAllowed(actor: Actor, visit: VisitRow, intent: VisitIntent['intent']) {
  if (FIELD_INTENTS.has(intent)) {
    if (!can(actor.role, 'record:work')) throw new VisitRefusal(403, 'Your role does not allow this.')
    if (!can(actor.role, 'record:any-visit') && visit.technicianId !== actor.id) {
      throw new VisitRefusal(403, 'This visit is not assigned to you; only its technician or the office can record work on it.')
    }
  } else if (!can(actor.role, 'schedule:visits')) {
    throw new VisitRefusal(403, 'Your role does not allow changing the booking.')
  }
}

function needStatus(visit: VisitRow, allowed: readonly VisitRow['status'][], doing: string) {
  if (!allowed.includes(visit.status)) throw new VisitRefusal(409, `This visit is ${visit.status}; it cannot be ${doing} now.`)
}

function entriesOnVisit(list: ItemRow[], entries: DetectorEntry[]) {
  const onVisit = new Set(list.map((i) => i.detectorId))
  const strangers = entries.filter((e) => !onVisit.has(e.detectorId)).map((e) => e.detectorId)
  if (strangers.length) throw new VisitRefusal(400, `Not on this visit: detector ${[...new Set(strangers)].join(', ')}.`, { detectorIds: strangers })
  const seen = new Set<number>()
  for (const e of entries) {
    if (seen.has(e.detectorId)) throw new VisitRefusal(400, `Detector ${e.detectorId} is entered twice; send one entry per detector.`)
    seen.add(e.detectorId)
  }
}

/**
 * Refuses entries that leave out a field check (the remote test station at a functional test, each head
 * of a two-head module) or are marked as passed over a fault those checks found.
 */
function checkFieldWork(list: ItemRow[], entries: DetectorEntry[]) {
  const byId = new Map(list.map((i) => [i.detectorId, i]))
  const problems: string[] = []
  const ids: number[] = []
  for (const e of entries) {
    const item = byId.get(e.detectorId)
    if (!item) continue
    const checks = fieldChecks({
      testStation: item.testStation,
      headsFitted: e.headsFitted ?? item.headsFitted,
      notTested: e.result === 'not-tested',
      functionalRecorded: e.functional !== undefined,
      cleaned: e.cleaned,
      testStationWorked: e.testStationWorked,
      testStationReset: e.testStationReset,
      heads: e.heads,
    })
    const refused = entryRefusals(checks, e.result)
    if (refused.length) {
      ids.push(e.detectorId)
      problems.push(`${item.tag}: ${refused.join(' ')}`)
    }
  }
  if (problems.length) throw new VisitRefusal(400, problems.join(' '), { detectorIds: ids })
}

const resultOf = (entry: DetectorEntry) => (entry.result === 'not-tested' ? 'skipped' : entry.result)

function readingRows(entry: DetectorEntry): Array<{ kind: string; value: number | null; open: boolean }> {
  const out: Array<{ kind: string; value: number | null; open: boolean }> = []
  for (const [state, v] of Object.entries(entry.loop ?? {})) {
    if (v !== undefined) out.push({ kind: `loop-${state}`, value: v === 'open' ? null : v, open: v === 'open' })
  }
  for (const [state, v] of Object.entries(entry.inputVolts ?? {})) if (v !== undefined) out.push({ kind: `input-${state}`, value: v, open: false })
  if (entry.pressureInWc !== undefined) out.push({ kind: 'pressure', value: entry.pressureInWc, open: false })
  if (entry.velocityFpm !== undefined) out.push({ kind: 'velocity', value: entry.velocityFpm, open: false })
  if (entry.sensitivityPctFt !== undefined) out.push({ kind: 'sensitivity', value: entry.sensitivityPctFt, open: false })
  return out
}

export interface WorkContext {
  /** The office day the work is dated by and the derivation judges against. */
  today: string
  now?: Date
  /** The rendered e-mail for 'email-notice' and 'email-all-clear' (rendering is async; the transaction is not). */
  email?: NewMessage
}

/** What an e-mail intent left in the outbox: the message, and whether this call queued it. */
export interface IntentResult {
  outboxId?: number
  queued?: boolean
}

/**
 * Applies one intent to a visit in one IMMEDIATE transaction: checks who may, checks the version the
 * caller read (an older one is refused, never merged), makes the change, bumps the version and writes
 * the audit entry. Throws `VisitRefusal` for anything the caller can fix.
 */
export function applyVisitIntent(db: Db, actor: Actor, visitId: number, input: VisitIntent, ctx: WorkContext): IntentResult {
  const now = (ctx.now ?? new Date()).toISOString()
  const q = db.$client
  let result: IntentResult = {}
  writeTx(db, () => {
    const visit = loadVisit(db, visitId)
    checkAllowed(actor, visit, input.intent)
    if (input.version !== visit.version) {
      throw new VisitRefusal(409, `This visit changed since you opened it (you had version ${input.version}, it is now ${visit.version}). Reload it, check the changes, then save again.`, { version: visit.version })
    }
    const audit = (before: unknown, after: unknown) => writeAudit(db, { actorId: actor.id, action: `visit.${input.intent}`, entity: 'visit', entityId: visit.id, before, after })
    const bump = (set = '', ...values: unknown[]) => q.prepare(`update visits set ${set ? `${set}, ` : ''}version = version + 1 where id = ?`).run(...values, visit.id)
    const outboxRow = (kind: 'notice' | 'all-clear') =>
      q.prepare('select id, status, error, to_address as toAddress from email_outbox where idempotency_key = ?').get(visitEmailKey(visit.id, kind)) as
        | { id: number; status: string; error: string | null; toAddress: string }
        | undefined
    const actorName = () => (q.prepare('select name from users where id = ?').get(actor.id) as { name: string } | undefined)?.name ?? `user ${actor.id}`

    switch (input.intent) {
      case 'notify': {
        needStatus(visit, ['planned', 'notified', 'in-progress'], 'notified')
        if (Date.parse(input.inTestUntil) <= Date.parse(input.inTestFrom)) throw new VisitRefusal(400, 'The in-test window must end after it starts.')
        const told = input.siteManagementTold ? input.siteContact || 'site management' : null
        const noticeId = Number(
          q
            .prepare(
              `insert into notifications (site_id, visit_id, monitoring_company_id, notified_at, notified_by, method, spoke_with, confirmation, in_test_from, in_test_until, site_contact_told)
               values (?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?)`,
            )
            .run(visit.siteId, visit.id, visit.companyId, now, actor.id, input.method, input.spokeWith, input.confirmation || null, input.inTestFrom, input.inTestUntil, told).lastInsertRowid,
        )
        const who = (q.prepare('select name from users where id = ?').get(actor.id) as { name: string } | undefined)?.name ?? `user ${actor.id}`
        const detail = [
          `${visit.company ?? 'Monitoring company'} told by ${input.method} by ${who}, spoke with ${input.spokeWith}`,
          input.confirmation ? `confirmation ${input.confirmation}` : 'no confirmation number',
          `in test ${input.inTestFrom} to ${input.inTestUntil}`,
          told ? `site management told (${told})` : 'site management not told',
        ].join('; ')
        q.prepare("insert into events (site_id, detector_id, occurred_at, kind, detail, user_id) values (?, null, ?, 'notice', ?, ?)").run(visit.siteId, now, detail, actor.id)
        if (visit.status === 'planned') bump("status = 'notified'")
        else bump()
        audit({ status: visit.status }, { status: visit.status === 'planned' ? 'notified' : visit.status, noticeId })
        return
      }
      case 'start': {
        needStatus(visit, ['planned', 'notified'], 'started')
        const notice = q.prepare('select 1 from notifications where visit_id = ? limit 1').get(visit.id)
        if (!notice) {
          throw new VisitRefusal(
            409,
            `Log the notice to ${visit.company ?? 'the monitoring company'} before starting: the system must be placed in test, and site management told, before anyone works on a detector.`,
          )
        }
        // A notice sent through the outbox counts once it has left; until then the company may not know.
        const latest = q.prepare('select confirmation from notifications where visit_id = ? order by notified_at desc, id desc limit 1').get(visit.id) as { confirmation: string | null }
        const mail = outboxRow('notice')
        if (mail && latest.confirmation === messageRef(mail.id) && mail.status !== 'sent') {
          throw new VisitRefusal(
            409,
            mail.status === 'failed'
              ? `The e-mailed notice to ${visit.company ?? 'the monitoring company'} did not go (${mail.error ?? 'no reason given'}). Send it again, or phone them and log that notice, before starting.`
              : `The e-mailed notice to ${visit.company ?? 'the monitoring company'} has not gone yet (${mail.status}). Wait until it shows as sent, or phone them and log that notice, before starting.`,
          )
        }
        bump("status = 'in-progress', started_at = ?", now)
        audit({ status: visit.status }, { status: 'in-progress', startedAt: now })
        return
      }
      case 'record': {
        needStatus(visit, ['in-progress'], 'recorded (start it first)')
        const list = items(db, visit.id)
        entriesOnVisit(list, input.entries)
        checkFieldWork(list, input.entries)
        const save = q.prepare('update visit_detectors set result = ?, result_reason = ?, findings = ?, notes = ? where visit_id = ? and detector_id = ?')
        for (const e of input.entries) save.run(resultOf(e), e.reason || null, JSON.stringify(findingsOf(e)), e.notes || null, visit.id, e.detectorId)
        bump()
        audit(null, { recorded: input.entries.map((e) => ({ detectorId: e.detectorId, result: e.result })) })
        return
      }
      case 'complete': {
        needStatus(visit, ['in-progress'], 'completed (start it first)')
        // Results are history: a day not yet come cannot hold one.
        const doneOn = input.doneOn ?? ctx.today
        if (doneOn > ctx.today) throw new VisitRefusal(400, `The work cannot be dated ${doneOn}: that is after today (${ctx.today}). Give the day it was done.`)
        completeVisit(db, actor, visit, input.entries, doneOn, ctx.today, now)
        bump("status = 'done', completed_at = ?", now)
        return
      }
      case 'all-clear': {
        needStatus(visit, ['in-progress', 'done'], 'cleared')
        const latest = q.prepare('select id, cleared_at as clearedAt from notifications where visit_id = ? order by notified_at desc, id desc limit 1').get(visit.id) as
          | { id: number; clearedAt: string | null }
          | undefined
        if (!latest) throw new VisitRefusal(409, 'No notice is logged for this visit, so there is nothing to clear.')
        const at = input.at ? new Date(input.at).toISOString() : now
        q.prepare('update notifications set cleared_at = ?, cleared_with = ?, cleared_by = ? where id = ?').run(at, input.confirmedWith, actor.id, latest.id)
        q.prepare("insert into events (site_id, detector_id, occurred_at, kind, detail, user_id) values (?, null, ?, 'notice', ?, ?)").run(
          visit.siteId,
          at,
          `All clear: system out of test, confirmed with ${input.confirmedWith} at ${visit.company ?? 'the monitoring company'}`,
          actor.id,
        )
        bump()
        audit({ clearedAt: latest.clearedAt }, { noticeId: latest.id, clearedAt: at, clearedWith: input.confirmedWith })
        return
      }
      case 'email-notice': {
        needStatus(visit, ['planned', 'notified', 'in-progress'], 'notified')
        if (Date.parse(input.inTestUntil) <= Date.parse(input.inTestFrom)) throw new VisitRefusal(400, 'The in-test window must end after it starts.')
        const message = emailFor(ctx, 'notice')
        // Once per visit: a second send (another tab, a double tap) leaves the first message and its log.
        const earlier = outboxRow('notice')
        if (earlier) {
          result = { outboxId: earlier.id, queued: false }
          return
        }
        const { id } = enqueue(db, message)
        const told = input.siteManagementTold ? input.siteContact || 'site management' : null
        const noticeId = Number(
          q
            .prepare(
              `insert into notifications (site_id, visit_id, monitoring_company_id, notified_at, notified_by, method, spoke_with, confirmation, in_test_from, in_test_until, site_contact_told)
               values (?, ?, ?, ?, ?, 'email', ?, ?, ?, ?, ?)`,
            )
            .run(visit.siteId, visit.id, visit.companyId, now, actor.id, message.to, messageRef(id), input.inTestFrom, input.inTestUntil, told).lastInsertRowid,
        )
        q.prepare("insert into events (site_id, detector_id, occurred_at, kind, detail, user_id) values (?, null, ?, 'notice', ?, ?)").run(
          visit.siteId,
          now,
          `Notice of work e-mailed to ${visit.company ?? 'the monitoring company'} (${message.to}) by ${actorName()}, ${messageRef(id)}; in test ${input.inTestFrom} to ${input.inTestUntil}; call back ${input.callBack}; ${told ? `site management told (${told})` : 'site management not told'}`,
          actor.id,
        )
        if (visit.status === 'planned') bump("status = 'notified'")
        else bump()
        audit({ status: visit.status }, { status: visit.status === 'planned' ? 'notified' : visit.status, noticeId, outboxId: id })
        result = { outboxId: id, queued: true }
        return
      }
      case 'email-all-clear': {
        needStatus(visit, ['in-progress', 'done'], 'cleared')
        const message = emailFor(ctx, 'all-clear')
        const earlier = outboxRow('all-clear')
        if (earlier) {
          result = { outboxId: earlier.id, queued: false }
          return
        }
        const latest = q.prepare('select id, cleared_at as clearedAt from notifications where visit_id = ? order by notified_at desc, id desc limit 1').get(visit.id) as
          | { id: number; clearedAt: string | null }
          | undefined
        if (!latest) throw new VisitRefusal(409, 'No notice is logged for this visit, so there is nothing to clear.')
        if (latest.clearedAt) throw new VisitRefusal(409, 'The all-clear for this visit is already logged.')
        const { id } = enqueue(db, message)
        q.prepare('update notifications set cleared_at = ?, cleared_with = ?, cleared_by = ? where id = ?').run(now, `${message.to} (${messageRef(id)})`, actor.id, latest.id)
        q.prepare("insert into events (site_id, detector_id, occurred_at, kind, detail, user_id) values (?, null, ?, 'notice', ?, ?)").run(
          visit.siteId,
          now,
          `All clear e-mailed to ${visit.company ?? 'the monitoring company'} (${message.to}) by ${actorName()}, ${messageRef(id)}: work finished, system to be taken out of test`,
          actor.id,
        )
        bump()
        audit({ clearedAt: latest.clearedAt }, { noticeId: latest.id, clearedAt: now, outboxId: id })
        result = { outboxId: id, queued: true }
        return
      }
      case 'retry-email': {
        const mail = outboxRow(input.kind)
        if (!mail) throw new VisitRefusal(404, `No ${input.kind === 'notice' ? 'notice' : 'all-clear'} e-mail was sent for this visit.`)
        if (!requeueFailed(db, mail.id)) throw new VisitRefusal(409, `That e-mail is ${mail.status}, not failed; only a failed one is sent again.`)
        bump()
        audit({ outboxId: mail.id, status: mail.status, error: mail.error }, { outboxId: mail.id, status: 'queued' })
        result = { outboxId: mail.id, queued: true }
        return
      }
      case 'cancel': {
        needStatus(visit, ['planned', 'notified'], 'cancelled')
        bump("status = 'cancelled', cancelled_at = ?, cancel_reason = ?", now, input.reason)
        audit({ status: visit.status }, { status: 'cancelled', reason: input.reason })
        return
      }
      case 'reschedule': {
        needStatus(visit, ['planned', 'notified', 'in-progress'], 'rescheduled')
        if (input.scheduledOn < ctx.today) throw new VisitRefusal(400, 'Pick today or a later date.')
        const from = input.windowFrom ?? null
        const until = input.windowUntil ?? null
        checkWindow(from ?? undefined, until ?? undefined)
        checkWorkingDay(db, { name: visit.siteName, region: visit.region }, input.scheduledOn)
        bump('scheduled_on = ?, window_from = ?, window_until = ?', input.scheduledOn, from, until)
        audit({ scheduledOn: visit.scheduledOn, window: [visit.windowFrom, visit.windowUntil] }, { scheduledOn: input.scheduledOn, window: [from, until] })
        return
      }
      case 'assign': {
        needStatus(visit, ['planned', 'notified', 'in-progress'], 'reassigned')
        checkTechnician(db, input.technicianId)
        bump('technician_id = ?', input.technicianId)
        audit({ technicianId: visit.technicianId }, { technicianId: input.technicianId })
        return
      }
      case 'edit': {
        const kind = input.kind ?? visit.kind
        const notes = input.notes === undefined ? visit.notes : input.notes || null
        bump('kind = ?, notes = ?', kind, notes)
        audit({ kind: visit.kind, notes: visit.notes }, { kind, notes })
        return
      }
    }
  })
  listsChanged()
  return result
}

function emailFor(ctx: WorkContext, kind: 'notice' | 'all-clear'): NewMessage {
  if (ctx.email?.kind !== kind) throw new Error(`The ${kind} e-mail must be rendered before its intent is applied`)
  return ctx.email
}

/**
 * Writes the visit's history: per detector the readings, one result per task covered, the visit
 * row's result, an event, the facts found on the record; then re-derives those detectors. Runs inside
 * the caller's transaction.
 */
function completeVisit(db: Db, actor: Actor, visit: VisitRow, given: DetectorEntry[], doneOn: string, today: string, now: string) {
  const q = db.$client
  const list = items(db, visit.id)
  entriesOnVisit(list, given)
  checkFieldWork(list, given)
  const byId = new Map(given.map((e) => [e.detectorId, e]))
  const entries = list.map((item) => ({ item, entry: byId.get(item.detectorId) ?? entryFromRow(item) }))
  const missing = entries.filter((x) => x.entry === null).map((x) => x.item)
  if (missing.length) {
    throw new VisitRefusal(
      400,
      `No result for ${missing.map((m) => `${m.tag} (detector ${m.detectorId})`).join(', ')}: record each one, or mark it not tested with the reason.`,
      { detectorIds: missing.map((m) => m.detectorId) },
    )
  }
  const insReading = q.prepare('insert into readings (detector_id, visit_id, taken_at, kind, value, open, taken_by) values (?, ?, ?, ?, ?, ?, ?)')
  const insResult = q.prepare('insert into task_results (detector_id, visit_id, task, done_on, outcome, value, recorded_by) values (?, ?, ?, ?, ?, ?, ?)')
  const saveItem = q.prepare('update visit_detectors set result = ?, result_reason = ?, findings = ?, notes = ?, completed_at = ? where visit_id = ? and detector_id = ?')
  const insEvent = q.prepare('insert into events (site_id, detector_id, occurred_at, kind, detail, user_id) values (?, ?, ?, ?, ?, ?)')
  const summary: Array<{ detectorId: number; result: string; tasks: Record<string, string> }> = []
  for (const { item, entry: e } of entries as Array<{ item: ItemRow; entry: DetectorEntry }>) {
    // A fitted station operated with the functional test writes its own result.
    const tasks = tasksWithStation(item.tasks.split(',').filter(Boolean) as VisitTask[], item.testStation, e.testStationWorked !== undefined)
    // A detector not tested keeps no readings or results from this visit; its reason says why.
    if (e.result !== 'not-tested') for (const r of readingRows(e)) insReading.run(e.detectorId, visit.id, now, r.kind, r.value, r.open ? 1 : 0, actor.id)
    const outcomes = taskOutcomes(tasks, e, e.headsFitted ?? item.headsFitted)
    for (const o of outcomes) insResult.run(e.detectorId, visit.id, o.task, doneOn, o.outcome, o.value, actor.id)
    saveItem.run(resultOf(e), e.reason || null, JSON.stringify(findingsOf(e)), e.notes || null, now, visit.id, e.detectorId)
    insEvent.run(visit.siteId, e.detectorId, now, eventKind(outcomes), eventDetail(visit.id, outcomes, e), actor.id)
    if (e.result !== 'not-tested' && (e.delaySecondsFound !== undefined || e.headsFitted !== undefined)) {
      q.prepare(
        `update detectors set delay_seconds = coalesce(?, delay_seconds), delay_observed_on = case when ? is null then delay_observed_on else ? end,
           heads_fitted = coalesce(?, heads_fitted), version = version + 1, updated_at = ? where id = ?`,
      ).run(e.delaySecondsFound ?? null, e.delaySecondsFound ?? null, doneOn, e.headsFitted ?? null, now, e.detectorId)
    }
    summary.push({ detectorId: e.detectorId, result: resultOf(e), tasks: Object.fromEntries(outcomes.map((o) => [o.task, o.outcome])) })
  }
  rederive(
    db,
    list.map((i) => i.detectorId),
    today,
  )
  writeAudit(db, { actorId: actor.id, action: 'visit.complete', entity: 'visit', entityId: visit.id, before: { status: visit.status }, after: { status: 'done', completedAt: now, detectors: summary } })
}
