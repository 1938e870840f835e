import { render } from '@react-email/render'
import DigestEmail from '~/emails/digest'
import type { Db } from '../db'
import { digestFigures, digestKey, type DigestRecipient } from './digest'
import type { NewMessage } from './send'

export function appUrl(): string {
  return (process.env.APP_URL ?? `http://localhost:${process.env.PORT ?? 3000}`).replace(/\/$/, '')
}

/** One person's digest, rendered to HTML and plain text, ready for the outbox. */
export async function digestMessage(db: Db, r: Pick<DigestRecipient, 'userId' | 'email' | 'name' | 'customerIds'>, today: string): Promise<NewMessage> {
  const figures = digestFigures(db, { today, customerIds: r.customerIds.length ? r.customerIds : null })
  const element = <DigestEmail figures={figures} name={r.name} appUrl={appUrl()} />
  const [html, text] = await Promise.all([render(element), render(element, { plainText: true })])
  return {
    kind: 'digest',
    idempotencyKey: digestKey(r.userId, today),
    recipientUserId: r.userId,
    to: r.email,
    subject: `Ductkeeper weekly digest: ${figures.overdue.any} overdue, ${figures.trouble.now} in trouble`,
    html,
    text,
  }
}
