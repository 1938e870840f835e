import { Body, Container, Head, Heading, Hr, Html, Link, Preview, Section, Text } from '@react-email/components'
import type { DigestFigures } from '~/.server/email/digest'
import type { WeekFigures } from '~/.server/email/snapshots'
import type { ReasonCode } from '~/domain/vocabulary'
import { C, DARK_CSS, FONT } from './look'

const REASON_WORDS: Record<ReasonCode, string> = {
  'in-trouble': 'in trouble at the panel',
  'in-alarm': 'showing alarm or supervisory',
  'out-of-service': 'out of service',
  overdue: 'overdue',
  'failed-test': 'failed its last test',
  'failed-diagnosis': 'readings point at a wiring fault',
  'repeated-troubles': 'repeated troubles in 30 days',
  'humid-unrated': 'humid location, standard housing',
  'delay-disagrees': 'reporting delay differs from site policy',
  'delay-unknown': 'reporting delay not recorded',
  'supervision-unproven': 'loop never shown to report trouble',
}

export interface DigestLine {
  label: string
  value: number
  href: string
  /** Last week's figure, for an arrow and its words; absent where no earlier figure is kept. */
  before?: number
  note?: string
}

export interface DigestSection {
  title: string
  lines: DigestLine[]
}

/**
 * The digest's figures as titled lines, each with the console view that shows it. `lastWeek` is what
 * last week's digest said; the week's failed tests, visits and notices fall back on the history's own
 * count for the week before when no digest was kept.
 */
export function digestSections(f: DigestFigures, appUrl: string, lastWeek: WeekFigures | null = null): DigestSection[] {
  const scope = f.customers?.length === 1 ? `&customer=${f.customers[0].id}` : ''
  const u = (path: string) => `${appUrl}${path}`
  const tasks = ['visual', 'functional', 'sensitivity', 'cleaning'] as const
  return [
    {
      title: 'Due dates',
      lines: [
        { label: 'Detectors overdue', value: f.overdue.any, before: lastWeek?.overdue, href: u(`/devices?due=overdue${scope}`) },
        ...tasks.map((t) => ({ label: `  ${t} overdue`, value: f.overdue[t], href: u(`/devices?due=overdue${scope}&sort=nextDueOn`) })),
        { label: 'Falling due in the next two weeks', value: f.dueSoon.any, before: lastWeek?.dueSoon, href: u(`/devices?nextDueFrom=${f.today}&nextDueTo=${addDaysIso(f.today, 14)}${scope}`) },
        ...tasks.map((t) => ({ label: `  ${t} due`, value: f.dueSoon[t], href: u(`/devices?nextDueFrom=${f.today}&nextDueTo=${addDaysIso(f.today, 14)}${scope}`) })),
      ],
    },
    {
      title: 'Faults',
      lines: [
        {
          label: 'In trouble now',
          value: f.trouble.now,
          before: lastWeek?.trouble,
          href: u(`/devices?state=trouble${scope}`),
          note: f.trouble.now ? `${f.trouble.overAWeek} for over a week${f.trouble.longestDays !== null ? `; longest ${f.trouble.longestDays} days` : ''}` : undefined,
        },
        { label: 'Failed tests this week', value: f.failedTests.thisWeek, before: lastWeek?.failedTests ?? f.failedTests.weekBefore, href: u(`/triage?reason=failed-test`) },
        { label: 'Failed wiring diagnoses', value: f.failedDiagnoses.now, before: lastWeek?.failedDiagnoses, href: u(`/devices?loop=fail${scope}`), note: `${f.failedDiagnoses.newThisWeek} with readings taken this week` },
        { label: 'Reporting delay differs from policy', value: f.delayDisagree, before: lastWeek?.delayDisagree, href: u(`/delay-audit`) },
      ],
    },
    {
      title: 'Work',
      lines: [
        { label: 'Visits done this week', value: f.visitsDone.thisWeek, before: lastWeek?.visitsDone ?? f.visitsDone.weekBefore, href: u(`/visits?status=done&from=${addDaysIso(f.today, -6)}&to=${f.today}`) },
        { label: 'Visits planned for the coming week', value: f.visitsPlanned, before: lastWeek?.visitsPlanned, href: u(`/visits?status=planned,notified,in-progress&from=${f.today}&to=${addDaysIso(f.today, 6)}`) },
        { label: 'Monitoring-company notices logged', value: f.notices.thisWeek, before: lastWeek?.notices ?? f.notices.weekBefore, href: u(`/events?kind=notice`) },
      ],
    },
  ]
}

function addDaysIso(date: string, days: number): string {
  return new Date(Date.parse(`${date}T00:00:00Z`) + days * 86_400_000).toISOString().slice(0, 10)
}

/** ▲ / ▼ with the change, in words too, so the line reads right without colour or images. */
export function arrow(value: number, before: number | undefined): string {
  if (before === undefined) return ''
  if (value === before) return '= same as last week'
  return `${value > before ? '▲ up' : '▼ down'} ${Math.abs(value - before)} from ${before} last week`
}

export function reasonWords(codes: ReasonCode[]): string {
  const words = codes.map((c) => REASON_WORDS[c] ?? c).join('; ')
  return words.charAt(0).toUpperCase() + words.slice(1)
}

export default function DigestEmail({ figures, lastWeek = null, name, appUrl }: { figures: DigestFigures; lastWeek?: WeekFigures | null; name: string; appUrl: string }) {
  const sections = digestSections(figures, appUrl, lastWeek)
  const scope = figures.customers ? figures.customers.map((c) => c.name).join(', ') : 'the whole fleet'
  return (
    <Html lang="en">
      <Head>
        <meta name="color-scheme" content="light dark" />
        <meta name="supported-color-schemes" content="light dark" />
        <style>{DARK_CSS}</style>
      </Head>
      <Preview>{`${figures.overdue.any} overdue, ${figures.trouble.now} in trouble, ${figures.failedTests.thisWeek} failed tests this week`}</Preview>
      <Body className="dk-body" style={{ background: C.paper, fontFamily: FONT, color: C.ink, margin: 0, padding: '16px 0' }}>
        <Container className="dk-card" style={{ background: C.panel, border: `1px solid ${C.line}`, borderRadius: 6, maxWidth: 600, padding: '20px 24px' }}>
          <Text className="dk-soft" style={{ color: C.accent, fontSize: 13, fontWeight: 700, letterSpacing: '0.06em', margin: 0, textTransform: 'uppercase' }}>
            Ductkeeper weekly digest
          </Text>
          <Heading as="h1" className="dk-ink" style={{ fontSize: 22, margin: '6px 0 4px', color: C.ink }}>
            Week to {figures.today}
          </Heading>
          <Text className="dk-soft" style={{ color: C.soft, fontSize: 14, margin: '0 0 12px' }}>
            For {name}: {figures.detectors} detectors in {scope}. Every figure opens the console view that shows it.{' '}
            {lastWeek
              ? 'Changes are against the figures in your digest last week.'
              : 'Your digest last week was not kept, so only the week’s own tests, visits and notices show a change.'}
          </Text>
          {sections.map((s) => (
            <Section key={s.title} style={{ marginTop: 12 }}>
              <Heading as="h2" className="dk-ink" style={{ fontSize: 15, margin: '8px 0 4px', color: C.ink, borderBottom: `1px solid ${C.line}`, paddingBottom: 4 }}>
                {s.title}
              </Heading>
              {s.lines.map((l) => (
                <Text key={l.label} className="dk-ink" style={{ fontSize: 14, margin: '3px 0', color: C.ink, paddingLeft: l.label.startsWith('  ') ? 16 : 0 }}>
                  <Link className="dk-link dk-figure" href={l.href} style={{ color: C.accent, fontWeight: 700, textDecoration: 'underline' }}>
                    {l.value}
                  </Link>{' '}
                  {l.label.trim()}
                  {l.before !== undefined ? (
                    <span className="dk-soft" style={{ color: C.soft, fontSize: 13 }}>
                      {' '}
                      ({arrow(l.value, l.before)})
                    </span>
                  ) : null}
                  {l.note ? (
                    <span className="dk-soft" style={{ color: C.faint, fontSize: 13 }}>
                      {' '}
                      — {l.note}
                    </span>
                  ) : null}
                </Text>
              ))}
            </Section>
          ))}
          <Section style={{ marginTop: 12 }}>
            <Heading as="h2" className="dk-ink" style={{ fontSize: 15, margin: '8px 0 4px', color: C.ink, borderBottom: `1px solid ${C.line}`, paddingBottom: 4 }}>
              Most at risk
            </Heading>
            {figures.atRisk.length === 0 ? (
              <Text className="dk-soft" style={{ fontSize: 14, color: C.soft }}>
                No detector has a risk reason this week.
              </Text>
            ) : (
              figures.atRisk.map((d) => (
                <Text key={d.id} className="dk-ink" style={{ fontSize: 14, margin: '4px 0', color: C.ink }}>
                  <Link className="dk-link" href={`${appUrl}/devices/${d.id}`} style={{ color: C.accent, fontWeight: 700 }}>
                    {d.tag}
                  </Link>{' '}
                  <span className="dk-soft" style={{ color: C.soft }}>
                    {d.customer} · {d.site} · risk {d.score}
                  </span>
                  <br />
                  {reasonWords(d.reasons)}
                </Text>
              ))
            )}
          </Section>
          <Hr style={{ borderColor: C.line, margin: '16px 0 8px' }} />
          <Text className="dk-soft" style={{ color: C.faint, fontSize: 12, margin: 0 }}>
            Figures as of the office&apos;s day {figures.today}. Change the day, hour or customers you follow under{' '}
            <Link className="dk-link" href={`${appUrl}/settings`} style={{ color: C.accent }}>
              Settings
            </Link>
            . Local codes, the AHJ and the device&apos;s instructions take precedence over any figure here.
          </Text>
        </Container>
      </Body>
    </Html>
  )
}
