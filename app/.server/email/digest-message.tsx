import { render, type Options } from '@react-email/render'
import DigestEmail from '~/emails/digest'
import { writeTx, type Db } from '../db'
import { digestFigures, digestKey, type DigestRecipient, type FleetFigures } from './digest'
import { enqueue, type NewMessage } from './send'
import { lastWeekFigures, recordSnapshot, weekFiguresOf, type WeekFigures } from './snapshots'

export function appUrl(): string {
  return (process.env.APP_URL ?? `http://localhost:${process.env.PORT ?? 3000}`).replace(/\/$/, '')
}

type Recipient = Pick<DigestRecipient, 'userId' | 'email' | 'name' | 'customerIds'>

/**
 * One person's digest, rendered to HTML and plain text, ready for the outbox, with the figures to keep
 * for next week's comparison. Pass `fleet` when building several for the same day.
 */
export async function digestMessage(db: Db, r: Recipient, today: string, fleet?: FleetFigures): Promise<NewMessage & { week: WeekFigures }> {
  const figures = digestFigures(db, { today, customerIds: r.customerIds.length ? r.customerIds : null, fleet })
  const lastWeek = lastWeekFigures(db, r.userId, today)
  const element = <DigestEmail figures={figures} lastWeek={lastWeek} name={r.name} appUrl={appUrl()} />
  // In plain text a figure reads as its number: a web address before every count buried the words.
  const plain: Options = { plainText: true, htmlToTextOptions: { selectors: [{ selector: 'a.dk-figure', format: 'anchor', options: { ignoreHref: true } }] } }
  const [html, text] = await Promise.all([render(element), render(element, plain)])
  return {
    kind: 'digest',
    idempotencyKey: digestKey(r.userId, today),
    recipientUserId: r.userId,
    to: r.email,
    subject: `Ductkeeper weekly digest: ${figures.overdue.any} overdue, ${figures.trouble.now} in trouble`,
    html,
    text,
    week: weekFiguresOf(figures),
  }
}

/**
 * Queues this week's digest for one person and keeps its figures for next week's arrows, in one
 * transaction. A digest already queued this week keeps its message and its figures.
 */
export async function queueDigest(db: Db, r: Recipient, today: string, fleet?: FleetFigures): Promise<{ id: number; created: boolean }> {
  const { week, ...message } = await digestMessage(db, r, today, fleet)
  return writeTx(db, () => {
    const queued = enqueue(db, message)
    if (queued.created) recordSnapshot(db, r.userId, today, week)
    return queued
  })
}
