import { Body, Container, Head, Heading, Hr, Html, Link, Preview, Section, Text } from '@react-email/components'
import { C, DARK_CSS, FONT } from './look'

/** Everything the monitoring company needs to place an account in test, or to take it out again. */
export interface VisitEmailFacts {
  kind: 'notice' | 'all-clear'
  visitId: number
  site: string
  customer: string
  account: string | null
  address: string
  timeZone: string
  company: string
  /** The test window as read on the site's clock, e.g. "3 Jun 2026, 08:00 PDT". */
  window: { from: string; until: string }
  /** For the all-clear: when the work was reported finished, on the site's clock. */
  finishedAt?: string
  technician: string | null
  sender: string
  callBack: string
  siteContactTold: string | null
  detectors: { tag: string; unit: string; position: string; tasks: string[] }[]
  /** Detectors on the visit beyond those listed. */
  moreDetectors: number
}

const TASK_WORDS: Record<string, string> = { visual: 'visual inspection', functional: 'functional test', sensitivity: 'sensitivity test', cleaning: 'cleaning' }

export function visitEmailSubject(f: VisitEmailFacts): string {
  const account = f.account ? ` (account ${f.account})` : ''
  return f.kind === 'notice'
    ? `Place in test: ${f.site}${account}, ${f.window.from} to ${f.window.until}`
    : `All clear: ${f.site}${account}, work finished; please take the system out of test`
}

function Fact({ label, children }: { label: string; children: React.ReactNode }) {
  return (
    <Text className="dk-ink" style={{ margin: '0 0 10px', fontSize: 15, lineHeight: '21px', color: C.ink }}>
      <span className="dk-soft" style={{ display: 'block', color: C.soft, fontSize: 12, fontWeight: 700, letterSpacing: '0.04em', textTransform: 'uppercase' }}>
        {label}
      </span>
      {children}
    </Text>
  )
}

/**
 * The notice of work and the all-clear, one column so they read the same on a phone as on a desk.
 * Plain words first, the facts below, one per line, and the number to call back as a link.
 */
export default function VisitNoticeEmail({ facts: f }: { facts: VisitEmailFacts }) {
  const notice = f.kind === 'notice'
  const tel = `tel:${f.callBack.replace(/[^0-9+]/g, '')}`
  return (
    <Html lang="en">
      <Head>
        <meta name="color-scheme" content="light dark" />
        <meta name="supported-color-schemes" content="light dark" />
        <meta name="viewport" content="width=device-width, initial-scale=1" />
        <style>{DARK_CSS}</style>
      </Head>
      <Preview>{notice ? `Please place ${f.site} in test from ${f.window.from} to ${f.window.until}` : `Work at ${f.site} is finished: please take the system out of test`}</Preview>
      <Body className="dk-body" style={{ background: C.paper, fontFamily: FONT, color: C.ink, margin: 0, padding: '12px 0' }}>
        <Container className="dk-card" style={{ background: C.panel, border: `1px solid ${C.line}`, borderRadius: 6, maxWidth: 600, padding: '18px 18px' }}>
          <Text style={{ color: C.accent, fontSize: 13, fontWeight: 700, letterSpacing: '0.06em', margin: 0, textTransform: 'uppercase' }}>
            {notice ? 'Notice of work on a fire alarm account' : 'All clear: work finished'}
          </Text>
          <Heading as="h1" className="dk-ink" style={{ fontSize: 21, lineHeight: '27px', margin: '6px 0 8px', color: C.ink }}>
            {notice ? `Please place ${f.site} in test` : `Please take ${f.site} out of test`}
          </Heading>
          <Text className="dk-ink" style={{ fontSize: 15, lineHeight: '22px', margin: '0 0 14px', color: C.ink }}>
            {notice ? (
              <>
                Our technician will test duct smoke detectors at this site from <strong>{f.window.from}</strong> until <strong>{f.window.until}</strong>. Test trips
                will send alarm, supervisory and trouble signals from this account during that window. Please place the account in test for the window and
                confirm by calling{' '}
                <Link className="dk-link" href={tel} style={{ color: C.accent, fontWeight: 700, whiteSpace: 'nowrap' }}>
                  {f.callBack}
                </Link>{' '}
                or replying to this message.
              </>
            ) : (
              <>
                The work under our notice for {f.window.from} to {f.window.until} is finished{f.finishedAt ? ` (${f.finishedAt})` : ''}. Please take the account
                out of test and check that it shows normal. If any signal from this site does not restore, call{' '}
                <Link className="dk-link" href={tel} style={{ color: C.accent, fontWeight: 700, whiteSpace: 'nowrap' }}>
                  {f.callBack}
                </Link>{' '}
                before closing the test.
              </>
            )}
          </Text>
          <Section style={{ borderTop: `1px solid ${C.line}`, paddingTop: 12 }}>
            <Fact label="Site">
              {f.site} · {f.customer}
            </Fact>
            <Fact label="Monitoring account">{f.account ?? 'not on our record: please match by the address'}</Fact>
            <Fact label="Address">{f.address}</Fact>
            <Fact label={notice ? 'Test window (site time)' : 'Test window that ends now (site time)'}>
              {f.window.from} to {f.window.until}
            </Fact>
            <Fact label="Technician">{f.technician ?? 'not yet assigned'}</Fact>
            <Fact label="Call back">
              <Link className="dk-link" href={tel} style={{ color: C.accent, fontWeight: 700, fontSize: 17 }}>
                {f.callBack}
              </Link>{' '}
              <span className="dk-soft" style={{ color: C.soft }}>({f.sender})</span>
            </Fact>
            {notice && <Fact label="Site management told">{f.siteContactTold ?? 'not yet'}</Fact>}
          </Section>
          {notice && (
            <Section style={{ borderTop: `1px solid ${C.line}`, paddingTop: 12 }}>
              <Text className="dk-soft" style={{ color: C.soft, fontSize: 12, fontWeight: 700, letterSpacing: '0.04em', textTransform: 'uppercase', margin: '0 0 6px' }}>
                Detectors to be worked on ({f.detectors.length + f.moreDetectors})
              </Text>
              {f.detectors.map((d) => (
                <Text key={d.tag} className="dk-ink" style={{ margin: '0 0 6px', fontSize: 14, lineHeight: '20px', color: C.ink }}>
                  <strong style={{ fontFamily: 'ui-monospace, Menlo, Consolas, monospace' }}>{d.tag}</strong>{' '}
                  <span className="dk-soft" style={{ color: C.soft }}>
                    unit {d.unit}, {d.position}: {d.tasks.map((t) => TASK_WORDS[t] ?? t).join(', ')}
                  </span>
                </Text>
              ))}
              {f.moreDetectors > 0 && (
                <Text className="dk-soft" style={{ margin: '0 0 6px', fontSize: 14, color: C.soft }}>
                  and {f.moreDetectors} more on the same visit.
                </Text>
              )}
            </Section>
          )}
          <Text className="dk-caution" style={{ background: C.cautionSoft, color: C.caution, fontSize: 13, lineHeight: '19px', margin: '12px 0 0', padding: '8px 10px', borderRadius: 4 }}>
            HVAC work only: our technicians do not alter the fire alarm panel or cut alarm wiring. Local codes, the AHJ and the device&apos;s instructions apply.
          </Text>
          <Hr style={{ borderColor: C.line, margin: '14px 0 8px' }} />
          <Text className="dk-soft" style={{ color: C.faint, fontSize: 12, margin: 0 }}>
            Sent from Ductkeeper by {f.sender}, visit reference {f.visitId}. Please quote it when you call.
          </Text>
        </Container>
      </Body>
    </Html>
  )
}
