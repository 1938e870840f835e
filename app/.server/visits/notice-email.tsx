import { render } from '@react-email/render'
import VisitNoticeEmail, { visitEmailSubject, type VisitEmailFacts } from '~/emails/visit-notice'
import type { VisitIntent } from '~/domain/visit-forms'
import { siteDateTime, siteDay, siteTime } from '~/utils/time-format'
import type { Db } from '../db'
import { sendMessage, type NewMessage, type SendOutcome } from '../email/send'
import { VisitRefusal } from './refusal'
import { applyVisitIntent, visitEmailKey, type Actor, type WorkContext } from './work'

// Enough to find each detector on the roof; a visit over a whole campus lists the rest as a count.
const DETECTORS_LISTED = 40

type EmailIntent = Extract<VisitIntent, { intent: 'email-notice' | 'email-all-clear' | 'retry-email' }>

export const isEmailIntent = (input: VisitIntent): input is EmailIntent => input.intent === 'email-notice' || input.intent === 'email-all-clear' || input.intent === 'retry-email'

interface Head {
  site: string
  customer: string
  account: string | null
  street: string
  city: string
  region: string
  postalCode: string
  timeZone: string
  company: string | null
  companyEmail: string | null
  technician: string | null
}

function facts(db: Db, actor: Actor, visitId: number, input: Extract<EmailIntent, { intent: 'email-notice' | 'email-all-clear' }>, now: Date): VisitEmailFacts & { to: string } {
  const q = db.$client
  const head = q
    .prepare(
      `select s.name as site, c.name as customer, s.monitoring_account as account, s.street, s.city, s.region, s.postal_code as postalCode, s.time_zone as timeZone,
              m.name as company, m.email as companyEmail, t.name as technician
         from visits v join sites s on s.id = v.site_id join customers c on c.id = s.customer_id
         left join monitoring_companies m on m.id = s.monitoring_company_id left join users t on t.id = v.technician_id
        where v.id = ?`,
    )
    .get(visitId) as Head | undefined
  if (!head) throw new VisitRefusal(404, 'No such visit.')
  if (!head.company) throw new VisitRefusal(409, 'No monitoring company is on record for this site. Find out who monitors the fire alarm system before any work.')
  if (!head.companyEmail) throw new VisitRefusal(409, `${head.company} has no e-mail address on record: phone them and log the notice.`)
  const sender = (q.prepare('select name from users where id = ?').get(actor.id) as { name: string } | undefined)?.name ?? 'Ductkeeper'
  const at = (iso: string) => siteDateTime(iso, head.timeZone)
  // A window within one day names the day once: "15 Jun 2026, 08:00 PDT to 12:00 PDT".
  const span = (from: string, until: string) => ({ from: at(from), until: siteDay(from, head.timeZone) === siteDay(until, head.timeZone) ? siteTime(until, head.timeZone) : at(until) })
  let window: { from: string; until: string }
  let siteContactTold: string | null = null
  if (input.intent === 'email-notice') {
    window = span(input.inTestFrom, input.inTestUntil)
    siteContactTold = input.siteManagementTold ? input.siteContact || 'site management' : null
  } else {
    const latest = q
      .prepare('select in_test_from as f, in_test_until as u from notifications where visit_id = ? order by notified_at desc, id desc limit 1')
      .get(visitId) as { f: string; u: string } | undefined
    if (!latest) throw new VisitRefusal(409, 'No notice is logged for this visit, so there is nothing to clear.')
    window = span(latest.f, latest.u)
  }
  const detectors = q
    .prepare(
      `select d.tag, u.tag as unit, d.position, vd.tasks from visit_detectors vd join detectors d on d.id = vd.detector_id join units u on u.id = d.unit_id
        where vd.visit_id = ? order by u.tag, d.tag, d.id limit ?`,
    )
    .all(visitId, DETECTORS_LISTED + 1) as { tag: string; unit: string; position: string; tasks: string }[]
  const total = q.prepare('select count(*) from visit_detectors where visit_id = ?').pluck().get(visitId) as number
  const listed = detectors.slice(0, DETECTORS_LISTED)
  return {
    to: head.companyEmail,
    kind: input.intent === 'email-notice' ? 'notice' : 'all-clear',
    visitId,
    site: head.site,
    customer: head.customer,
    account: head.account,
    address: `${head.street}, ${head.city}, ${head.region.replace(/^[A-Z]{2}-/, '')} ${head.postalCode}`,
    timeZone: head.timeZone,
    company: head.company,
    window,
    finishedAt: input.intent === 'email-all-clear' ? at(now.toISOString()) : undefined,
    technician: head.technician,
    sender,
    callBack: input.callBack,
    siteContactTold,
    detectors: listed.map((d) => ({ tag: d.tag, unit: d.unit, position: d.position, tasks: d.tasks.split(',').filter(Boolean) })),
    moreDetectors: total - listed.length,
  }
}

/** The notice or all-clear rendered for the outbox, keyed so each goes once per visit. */
export async function visitEmail(f: VisitEmailFacts & { to: string }): Promise<NewMessage> {
  const element = <VisitNoticeEmail facts={f} />
  const [html, text] = await Promise.all([render(element), render(element, { plainText: true })])
  return { kind: f.kind, idempotencyKey: visitEmailKey(f.visitId, f.kind), visitId: f.visitId, to: f.to, subject: visitEmailSubject(f), html, text }
}

export interface EmailIntentResult {
  outboxId: number
  /** 'already' when this visit's e-mail of that kind was queued before: nothing new is sent. */
  outcome: SendOutcome | 'already'
}

/**
 * Sends the visit's notice or all-clear by e-mail, or a failed one again: renders the message, logs it
 * on the visit through the one visit write path (version, audit, once per visit and kind), then hands
 * it to the provider at once. A send that fails stays in the outbox with its reason, to be retried.
 */
export async function applyEmailIntent(db: Db, actor: Actor, visitId: number, input: EmailIntent, ctx: WorkContext): Promise<EmailIntentResult> {
  const now = ctx.now ?? new Date()
  const email = input.intent === 'retry-email' ? undefined : await visitEmail(facts(db, actor, visitId, input, now))
  const r = applyVisitIntent(db, actor, visitId, input, { ...ctx, email })
  if (r.outboxId === undefined) throw new Error('An e-mail intent left no outbox message')
  if (!r.queued) return { outboxId: r.outboxId, outcome: 'already' }
  return { outboxId: r.outboxId, outcome: await sendMessage(db, r.outboxId, { force: true }) }
}
