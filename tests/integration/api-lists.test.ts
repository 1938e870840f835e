import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type { deviceReport } from '~/.server/device-report'
import { runList } from '~/.server/list-query'
import { BROAD_COUNT_CAP, eventList, eventQuery, type EventQuery } from '~/.server/lists/events'
import type { siteRecord } from '~/.server/repos/site'
import type { visitRecord } from '~/.server/repos/visit'
import { addDays } from '~/domain/dates'
import { startServer } from '#tests/setup/server'
import { sessionCookieFor, userIdByEmail } from '#tests/setup/sessions'
import { seededDb, TEST_TODAY } from '#tests/setup/temp-db'

type SiteRecord = NonNullable<ReturnType<typeof siteRecord>>
type VisitRecord = NonNullable<ReturnType<typeof visitRecord>>
type DeviceReport = NonNullable<ReturnType<typeof deviceReport>>

// Every expectation here comes from plain SQL written for the test, not from the list specs: the
// routes must page, filter and sort exactly as these independent queries do.

let server: Awaited<ReturnType<typeof startServer>>
let data: ReturnType<typeof seededDb>
let cookie = ''
// The server's office day is pinned to the seed's.
const today = TEST_TODAY
// Two sites with no visit to come in the seed, given some here.
let soonSite = 0
let laterSite = 0
// The site and the detector with the most events.
let busySite = 0
let busyDetector = 0
// The one-word town with the most detectors, in lower case.
let busyTown = ''
// The two regions with the most sites.
let regionA = ''
let regionB = ''

beforeAll(async () => {
  data = seededDb('small')
  const sql = data.db.$client
  ;[soonSite, laterSite] = (
    sql
      .prepare(
        `select id from sites where id not in (select site_id from visits where scheduled_on >= ? and status in ('planned', 'notified', 'in-progress'))
         order by id limit 2`,
      )
      .all(today) as Array<{ id: number }>
  ).map((r) => r.id)
  busySite = (sql.prepare('select site_id as id from events group by site_id order by count(*) desc, site_id limit 1').get() as { id: number }).id
  busyDetector = (
    sql.prepare('select detector_id as id from events where detector_id is not null group by detector_id order by count(*) desc, detector_id limit 1').get() as { id: number }
  ).id
  busyTown = (
    sql.prepare("select lower(s.city) as town from detectors d join sites s on s.id = d.site_id where s.city not like '% %' group by s.city order by count(*) desc, s.city limit 1").get() as { town: string }
  ).town
  ;[regionA, regionB] = (sql.prepare('select region from sites group by region order by count(*) desc, region limit 2').all() as Array<{ region: string }>).map((r) => r.region)
  const visit = sql.prepare(
    'insert into visits (site_id, kind, scheduled_on, technician_id, status, created_by) values (?, ?, ?, ?, ?, 3)',
  )
  visit.run(soonSite, 'repair', addDays(today, 1), 4, 'cancelled') // cancelled: not a visit to come
  visit.run(soonSite, 'test', addDays(today, 3), 4, 'planned')
  visit.run(soonSite, 'cleaning', addDays(today, 9), null, 'notified')
  visit.run(laterSite, 'test', addDays(today, -2), 4, 'planned') // already past
  visit.run(laterSite, 'inspection', addDays(today, 20), 6, 'notified')
  server = await startServer(data.path)
  cookie = (await sessionCookieFor(data.db, userIdByEmail(data.db, 'tech@ductkeeper.test'))).cookie
})

afterAll(async () => {
  await server?.stop()
  data?.cleanup()
})

const get = (path: string, withCookie = cookie) => fetch(server.url + path, { headers: { Cookie: withCookie, Accept: 'application/json' } })
const ids = (sql: string, ...params: unknown[]) =>
  (data.db.$client.prepare(sql).all(...params) as Array<{ id: number }>).map((r) => r.id)

interface Page {
  rows: Array<Record<string, unknown> & { id: number }>
  total: number
  offset: number
  limit: number
}

/** Walks a list page by page until a short page, checking each page's envelope on the way. */
async function walk(path: string, limit: number) {
  const seen: number[] = []
  const totals = new Set<number>()
  for (let offset = 0; offset < 10_000; offset += limit) {
    const res = await get(`${path}${path.includes('?') ? '&' : '?'}limit=${limit}&offset=${offset}`)
    expect(res.status, path).toBe(200)
    const page = (await res.json()) as Page
    expect(page.offset).toBe(offset)
    expect(page.limit).toBe(limit)
    expect(page.rows.length).toBeLessThanOrEqual(limit)
    totals.add(page.total)
    seen.push(...page.rows.map((r) => r.id))
    if (page.rows.length < limit) break
  }
  return { ids: seen, totals: [...totals] }
}

interface Case {
  name: string
  path: string | (() => string)
  sql: string
  params?: () => unknown[]
  limit?: number
}

const CASES: Case[] = [
  {
    name: 'devices: state=trouble,normal & due=overdue by tag',
    path: '/api/devices?state=trouble,normal&due=overdue&sort=tag',
    sql: `select id from detectors where state in ('trouble', 'normal') and due_status = 'overdue' order by tag, id`,
  },
  {
    name: 'devices: state=trouble & due=overdue,due-soon by tag',
    path: '/api/devices?state=trouble&due=overdue,due-soon&sort=tag',
    sql: `select id from detectors where state = 'trouble' and due_status in ('overdue', 'due-soon') order by tag, id`,
    limit: 1,
  },
  {
    name: 'devices: one customer by risk, highest first',
    path: '/api/devices?customer=1&sort=risk&dir=desc',
    sql: 'select id from detectors where customer_id = 1 order by risk_score desc, id desc',
  },
  {
    name: 'devices: words of a town, by site',
    path: () => `/api/devices?q=${busyTown}&sort=site`,
    sql: `select d.id from detectors d join sites s on s.id = d.site_id
          where (s.name || ' ' || s.street || ' ' || s.city) like '%' || ? || '%' order by s.name, d.id`,
    params: () => [busyTown],
  },
  {
    name: 'customers: by overdue detectors, most first',
    path: '/api/customers?sort=overdue&dir=desc',
    sql: `select c.id from customers c left join detectors d on d.customer_id = c.id and d.due_status = 'overdue'
          group by c.id order by count(d.id) desc, c.id desc`,
    limit: 2,
  },
  {
    name: 'customers: restaurants and schools by name',
    path: '/api/customers?kind=restaurant&kind=school',
    sql: `select id from customers where kind in ('restaurant', 'school') order by name, id`,
    limit: 1,
  },
  {
    name: 'customers: by sites',
    path: '/api/customers?sort=sites',
    sql: 'select c.id from customers c left join sites s on s.customer_id = c.id group by c.id order by count(s.id), c.id',
    limit: 2,
  },
  {
    name: 'customers: by detectors in trouble, most first',
    path: '/api/customers?sort=inTrouble&dir=desc',
    sql: `select c.id from customers c left join detectors d on d.customer_id = c.id and d.state = 'trouble'
          group by c.id order by count(d.id) desc, c.id desc`,
    limit: 2,
  },
  {
    name: 'sites: by detectors, most first',
    path: '/api/sites?sort=detectors&dir=desc',
    sql: 'select s.id from sites s left join detectors d on d.site_id = s.id group by s.id order by count(d.id) desc, s.id desc',
  },
  {
    name: 'sites: two regions by city',
    path: () => `/api/sites?region=${regionA},${regionB}&sort=city`,
    sql: 'select id from sites where region in (?, ?) order by city, id',
    params: () => [regionA, regionB],
    // The small data has a handful of sites per region: pages of three still walk more than one.
    limit: 3,
  },
  {
    name: 'sites: by the next visit to come, latest first',
    path: '/api/sites?sort=nextVisitOn&dir=desc',
    sql: `select s.id from sites s
          left join visits v on v.site_id = s.id and v.status in ('planned', 'notified') and v.scheduled_on >= ?
          group by s.id order by min(v.scheduled_on) desc, s.id desc`,
    params: () => [today],
  },
  {
    name: 'sites: imc sites of one monitoring company by units',
    path: '/api/sites?codeBasis=imc&monitoring=2&sort=units',
    sql: `select s.id from sites s left join units u on u.site_id = s.id
          where s.code_basis = 'imc' and s.monitoring_company_id = 2 group by s.id order by count(u.id), s.id`,
    limit: 3,
  },
  {
    name: 'sites: by monitoring company name',
    path: '/api/sites?sort=monitoring&dir=desc',
    sql: `select s.id from sites s left join monitoring_companies m on m.id = s.monitoring_company_id order by m.name desc, s.id desc`,
  },
  {
    name: 'sites: one customer, default order',
    path: '/api/sites?customer=2&delayPolicy=0',
    sql: 'select id from sites where customer_id = 2 and delay_policy_seconds = 0 order by name, id',
    limit: 3,
  },
  {
    name: 'units: rtus by supply airflow, largest first',
    path: '/api/units?kind=rtu&sort=supplyCfm&dir=desc',
    sql: `select id from units where kind = 'rtu' order by supply_cfm desc, id desc`,
  },
  {
    name: 'units: one customer by detectors',
    path: '/api/units?customer=2&sort=detectors',
    sql: `select u.id from units u join sites s on s.id = u.site_id left join detectors d on d.unit_id = u.id
          where s.customer_id = 2 group by u.id order by count(d.id), u.id`,
  },
  {
    name: 'units: make-to-stop by customer',
    path: '/api/units?shutdownInput=make-to-stop&sort=customer',
    sql: `select u.id from units u join sites s on s.id = u.site_id join customers c on c.id = s.customer_id
          where u.shutdown_input = 'make-to-stop' order by c.name, u.id`,
  },
  {
    name: 'units: default order (site name)',
    path: '/api/units?kind=ahu,mau',
    sql: `select u.id from units u join sites s on s.id = u.site_id where u.kind in ('ahu', 'mau') order by s.name, u.id`,
  },
  {
    name: 'events: alarms and supervisories, newest first',
    path: '/api/events?kind=alarm,supervisory',
    sql: `select id from events where kind in ('alarm', 'supervisory') order by occurred_at desc, id desc`,
  },
  {
    name: 'events: one site by kind',
    path: () => `/api/events?site=${busySite}&sort=kind`,
    sql: 'select id from events where site_id = ? order by kind, id',
    params: () => [busySite],
    limit: 25,
  },
  {
    name: 'events: one detector by who recorded it',
    path: () => `/api/events?detector=${busyDetector}&sort=by&dir=desc`,
    sql: 'select e.id from events e left join users u on u.id = e.user_id where e.detector_id = ? order by u.name desc, e.id desc',
    params: () => [busyDetector],
    limit: 3,
  },
  {
    name: 'events: one customer within whole days',
    path: '/api/events?customer=1&from=2025-01-01&to=2025-06-30',
    sql: `select e.id from events e join sites s on s.id = e.site_id
          where s.customer_id = 1 and substr(e.occurred_at, 1, 10) between '2025-01-01' and '2025-06-30'
          order by e.occurred_at desc, e.id desc`,
    limit: 20,
  },
  {
    name: 'events: between two instants, one with an offset',
    path: `/api/events?from=2026-04-01T00:00:00Z&to=${encodeURIComponent('2026-05-10T12:00:00+02:00')}`,
    sql: `select id from events where occurred_at >= '2026-04-01T00:00:00.000Z' and occurred_at <= '2026-05-10T10:00:00.000Z'
          order by occurred_at desc, id desc`,
    limit: 20,
  },
  {
    name: 'events: words of a town',
    path: '/api/events?q=emberton',
    sql: `select e.id from events e join sites s on s.id = e.site_id
          where (s.name || ' ' || s.street || ' ' || s.city) like '%emberton%' order by e.occurred_at desc, e.id desc`,
    limit: 20,
  },
  {
    name: 'visits: planned, soonest first',
    path: '/api/visits?status=planned&sort=scheduledOn',
    sql: `select id from visits where status = 'planned' order by scheduled_on, id`,
    limit: 3,
  },
  {
    name: 'visits: by detectors, most first',
    path: '/api/visits?sort=detectors&dir=desc',
    sql: `select v.id from visits v left join visit_detectors vd on vd.visit_id = v.id group by v.id order by count(vd.detector_id) desc, v.id desc`,
  },
  {
    name: 'visits: by notified',
    path: '/api/visits?sort=notified',
    sql: `select v.id from visits v left join (select distinct visit_id from notifications) n on n.visit_id = v.id
          order by n.visit_id is not null, v.id`,
  },
  {
    name: 'visits: one customer by technician',
    path: '/api/visits?customer=1&sort=technician',
    sql: `select v.id from visits v join sites s on s.id = v.site_id left join users u on u.id = v.technician_id
          where s.customer_id = 1 order by u.name, v.id`,
    limit: 2,
  },
  {
    name: 'visits: one technician within dates, latest first',
    path: '/api/visits?technician=4&from=2025-01-01&to=2026-12-31',
    sql: `select id from visits where technician_id = 4 and scheduled_on between '2025-01-01' and '2026-12-31'
          order by scheduled_on desc, id desc`,
    limit: 2,
  },
  {
    name: 'visits: tests by city',
    path: '/api/visits?kind=test&sort=city',
    sql: `select v.id from visits v join sites s on s.id = v.site_id where v.kind = 'test' order by s.city, v.id`,
  },
]

describe('list routes page, filter and sort in SQL', () => {
  it.each(CASES)('$name', async (c) => {
    const expected = ids(c.sql, ...(c.params?.() ?? []))
    const limit = c.limit ?? 7
    // Each case spans more than one page, so the walk itself is tested.
    expect(expected.length, 'independent rows').toBeGreaterThan(limit)
    const { ids: got, totals } = await walk(typeof c.path === 'string' ? c.path : c.path(), limit)
    expect(got).toEqual(expected)
    expect(totals).toEqual([expected.length])
  })

  it('events: a broad search walks time order and finds the same events as a narrow one', () => {
    // Only the stress data has words broad enough for the route to choose it, so both plans run here.
    const expected = ids(
      `select e.id from events e join sites s on s.id = e.site_id
       where (s.name || ' ' || s.street || ' ' || s.city) like '%emberton%' order by e.occurred_at desc, e.id desc`,
    )
    for (const broad of [false, true]) {
      const query: EventQuery = { ...eventQuery.parse({ q: 'emberton', limit: '500' }), broad }
      const page = runList(data.db, eventList, query)
      expect(page.rows.map((r) => r.id), `broad: ${broad}`).toEqual(expected.slice(0, 500))
      // A broad word is counted only up to its cap, then reported as "more than".
      expect(page.total).toBe(broad ? Math.min(expected.length, BROAD_COUNT_CAP) : expected.length)
      expect(page.totalCapped).toBe(broad && expected.length > BROAD_COUNT_CAP)
    }
    // The cap itself, made small enough for this data: the count stops there and says so.
    const query: EventQuery = { ...eventQuery.parse({ q: 'emberton', limit: '5' }), broad: true }
    const capped = runList(data.db, { ...eventList, countCap: () => 9 }, query)
    expect(expected.length).toBeGreaterThan(9)
    expect([capped.total, capped.totalCapped]).toEqual([9, true])
    expect(capped.rows.map((r) => r.id)).toEqual(expected.slice(0, 5))
  })

  it('answers an empty page past the end, with the total', async () => {
    const res = await get('/api/events?kind=alarm&offset=100000')
    const page = (await res.json()) as Page
    expect(page.rows).toEqual([])
    expect(page.total).toBe(ids(`select id from events where kind = 'alarm'`).length)
  })

  it('takes the unfiltered total from the kept row counts', async () => {
    for (const [path, table] of [
      ['/api/customers', 'customers'],
      ['/api/sites', 'sites'],
      ['/api/units', 'units'],
      ['/api/events', 'events'],
      ['/api/visits', 'visits'],
      ['/api/devices', 'detectors'],
    ]) {
      const page = (await (await get(`${path}?limit=1`)).json()) as Page
      expect(page.total, path).toBe(ids(`select id from ${table}`).length)
    }
  })
})

describe('list rows carry the right figures', () => {
  it('customers: sites, detectors, overdue and in trouble', async () => {
    const page = (await (await get('/api/customers?limit=500')).json()) as Page
    const figures = data.db.$client
      .prepare(
        `select c.id, c.name, c.kind,
                (select count(*) from sites s where s.customer_id = c.id) as sites,
                count(d.id) as detectors, coalesce(sum(d.due_status = 'overdue'), 0) as overdue,
                coalesce(sum(d.state = 'trouble'), 0) as inTrouble
         from customers c left join detectors d on d.customer_id = c.id group by c.id order by c.name, c.id`,
      )
      .all()
    expect(page.rows).toEqual(figures)
  })

  it('sites: counts, monitoring company and the next visit to come', async () => {
    const page = (await (await get('/api/sites?limit=500&sort=id')).json()) as Page
    const figures = data.db.$client
      .prepare(
        `select s.id, s.customer_id as customerId, c.name as customer, m.name as monitoring,
                (select count(*) from units u where u.site_id = s.id) as units,
                (select count(*) from detectors d where d.site_id = s.id) as detectors,
                (select count(*) from detectors d where d.site_id = s.id and d.due_status = 'overdue') as overdue
         from sites s join customers c on c.id = s.customer_id
         left join monitoring_companies m on m.id = s.monitoring_company_id order by s.id`,
      )
      .all()
    expect(page.rows.map(({ id, customerId, customer, monitoring, units, detectors, overdue }) => ({ id, customerId, customer, monitoring, units, detectors, overdue }))).toEqual(figures)
    const next = Object.fromEntries(page.rows.map((r) => [r.id, r.nextVisitOn]))
    expect(next[soonSite]).toBe(addDays(today, 3))
    expect(next[laterSite]).toBe(addDays(today, 20))
  })

  it('units: site, customer and detectors', async () => {
    const page = (await (await get('/api/units?limit=500&sort=id')).json()) as Page
    const figures = data.db.$client
      .prepare(
        `select u.id, u.tag, s.name as site, c.name as customer, u.supply_cfm as supplyCfm, count(d.id) as detectors
         from units u join sites s on s.id = u.site_id join customers c on c.id = s.customer_id
         left join detectors d on d.unit_id = u.id group by u.id order by u.id`,
      )
      .all()
    expect(page.rows.map(({ id, tag, site, customer, supplyCfm, detectors }) => ({ id, tag, site, customer, supplyCfm, detectors }))).toEqual(figures)
  })

  it('events: detector tag, site and who recorded it', async () => {
    const page = (await (await get(`/api/events?site=${busySite}&limit=500`)).json()) as Page
    const figures = data.db.$client
      .prepare(
        `select e.id, e.occurred_at as occurredAt, e.kind, e.detail, e.detector_id as detectorId, d.tag as detectorTag,
                e.site_id as siteId, s.name as site, s.time_zone as timeZone, e.user_id as userId, u.name as by
         from events e left join detectors d on d.id = e.detector_id join sites s on s.id = e.site_id
         left join users u on u.id = e.user_id where e.site_id = ? order by e.occurred_at desc, e.id desc`,
      )
      .all(busySite)
    expect(page.rows).toEqual(figures)
    expect(page.rows.some((r) => r.by !== null)).toBe(true)
  })

  it('visits: detectors and notified as a boolean', async () => {
    const page = (await (await get('/api/visits?limit=500&sort=id')).json()) as Page
    const figures = (
      data.db.$client
        .prepare(
          `select v.id, u.name as technician, (select count(*) from visit_detectors vd where vd.visit_id = v.id) as detectors,
                  exists (select 1 from notifications n where n.visit_id = v.id) as notified
           from visits v left join users u on u.id = v.technician_id order by v.id limit 500`,
        )
        .all() as Array<{ notified: number }>
    ).map((r) => ({ ...r, notified: r.notified === 1 }))
    expect(page.rows.map(({ id, technician, detectors, notified }) => ({ id, technician, detectors, notified }))).toEqual(figures)
    expect(new Set(page.rows.map((r) => r.notified))).toEqual(new Set([true, false]))
  })
})

const BAD: Record<string, string[]> = {
  '/api/devices': ['limit=501', 'sort=nope', 'state=bogus', 'offset=-1', 'nextDueFrom=notadate', 'customer=abc'],
  '/api/customers': ['limit=501', 'sort=nope', 'kind=bogus', 'offset=-1', 'limit=0'],
  '/api/sites': ['limit=501', 'sort=nope', 'codeBasis=bogus', 'offset=-1', 'region=oregon', 'delayPolicy=-5', 'customer=abc'],
  '/api/units': ['limit=501', 'sort=nope', 'kind=bogus', 'offset=-1', 'shutdownInput=sideways', 'site=0'],
  '/api/events': ['limit=501', 'sort=nope', 'kind=bogus', 'offset=-1', 'from=notadate', 'to=2026-13', 'detector=1.5'],
  '/api/visits': ['limit=501', 'sort=nope', 'status=bogus', 'offset=-1', 'from=notadate', 'technician=x'],
}

describe('list routes refuse what they do not accept', () => {
  it.each(Object.entries(BAD))('%s: 400 with the issues', async (path, params) => {
    for (const p of params) {
      const res = await get(`${path}?${p}`)
      expect(res.status, `${path}?${p}`).toBe(400)
      const body = (await res.json()) as { error: string; issues: Array<{ path: string; message: string }> }
      expect(body.error).toBe('Invalid query')
      // A multi-value filter names the offending item: `state.0`.
      expect(body.issues.map((i) => i.path.split('.')[0]), p).toContain(p.split('=')[0])
      expect(body.issues.every((i) => i.message.length > 0)).toBe(true)
    }
  })

  it('events: sorts no index serves across all events are refused, and allowed within a site or detector', async () => {
    for (const sort of ['kind', 'detail', 'detector', 'site', 'by']) {
      const res = await get(`/api/events?sort=${sort}`)
      expect(res.status).toBe(400)
      const body = (await res.json()) as { issues: Array<{ path: string; message: string }> }
      expect(body.issues).toEqual([expect.objectContaining({ path: 'sort', message: expect.stringMatching(/detector or site/) })])
      expect((await get(`/api/events?sort=${sort}&kind=alarm`)).status).toBe(400)
      expect((await get(`/api/events?sort=${sort}&site=${busySite}`)).status).toBe(200)
      expect((await get(`/api/events?sort=${sort}&detector=${busyDetector}`)).status).toBe(200)
    }
    expect((await get('/api/events?sort=occurredAt&dir=asc&kind=alarm')).status).toBe(200)
  })

  it('sites: the day visits are judged from is the office calendar, not a parameter', async () => {
    expect((await get('/api/sites?today=2000-01-01')).status).toBe(200)
    const page = (await (await get(`/api/sites?today=2000-01-01&sort=id&limit=500`)).json()) as Page
    expect(page.rows.find((r) => r.id === laterSite)?.nextVisitOn).toBe(addDays(today, 20))
  })
})

const RECORDS = ['/api/customers/1', '/api/sites/1', '/api/units/1', '/api/devices/1', '/api/visits/1']

describe('the fleet API is for signed-in callers', () => {
  it.each([...Object.keys(BAD), ...RECORDS])('%s: 401 JSON without a session', async (path) => {
    const res = await get(path, '')
    expect(res.status).toBe(401)
    expect(res.headers.get('content-type')).toMatch(/application\/json/)
    expect(((await res.json()) as { error: string }).error).toMatch(/Sign in/)
  })

  it('answers 401 for a revoked or unknown session cookie too', async () => {
    expect((await get('/api/units', '__dk_session=nonsense')).status).toBe(401)
  })
})

describe('one-record routes', () => {
  const one = <T = Record<string, unknown>>(sql: string, ...params: unknown[]) => data.db.$client.prepare(sql).get(...params) as T
  const rows = <T = Record<string, unknown>>(sql: string, ...params: unknown[]) => data.db.$client.prepare(sql).all(...params) as T[]
  const json = async <T,>(path: string) => {
    const res = await get(path)
    expect(res.status, path).toBe(200)
    return (await res.json()) as T
  }

  it('site: the last 50 events of a busy site, with their total', async () => {
    const body = await json<SiteRecord>(`/api/sites/${busySite}`)
    expect(body.events.rows).toHaveLength(50)
    expect(body.events.rows.map((e) => e.id)).toEqual(ids('select id from events where site_id = ? order by occurred_at desc, id desc limit 50', busySite))
    expect(body.events.total).toBe(ids('select id from events where site_id = ?', busySite).length)
  })

  it('visit: site, technician, detectors with their tasks, notifications', async () => {
    const planned = one<{ id: number }>(
      `select v.id from visits v where v.technician_id is not null and exists (select 1 from visit_detectors vd where vd.visit_id = v.id) order by v.id limit 1`,
    )
    const body = await json<VisitRecord>(`/api/visits/${planned.id}`)
    expect(body.visit).toMatchObject(one('select id, kind, status, scheduled_on as scheduledOn from visits where id = ?', planned.id))
    expect(body.technician).toEqual(one('select u.id, u.name, u.email from users u join visits v on v.technician_id = u.id where v.id = ?', planned.id))
    expect(body.site.id).toBe(one<{ site_id: number }>('select site_id from visits where id = ?', planned.id).site_id)
    const expected = rows<{ id: number; tasks: string; result: string }>(
      'select detector_id as id, tasks, result from visit_detectors where visit_id = ? order by detector_id',
      planned.id,
    )
    expect(
      body.detectors.rows.map((d) => ({ id: d.id, tasks: d.tasks.join(','), result: d.result })).sort((a, b) => a.id - b.id),
    ).toEqual(expected)
    expect(body.detectors.total).toBe(expected.length)
    expect(Array.isArray(body.detectors.rows[0].tasks)).toBe(true)

    const done = one<{ id: number }>('select visit_id as id from notifications where visit_id is not null order by id limit 1')
    const doneBody = await json<VisitRecord>(`/api/visits/${done.id}`)
    expect(doneBody.notifications.rows.map((n) => n.id)).toEqual(ids('select id from notifications where visit_id = ? order by notified_at, id', done.id))
    expect(doneBody.notifications.rows.length).toBeGreaterThan(0)
  })

  it('device: the engine report for the device page', async () => {
    const body = await json<DeviceReport>(`/api/devices/${busyDetector}`)
    expect(body.device).toMatchObject(one('select id, tag, serial, site_id as siteId from detectors where id = ?', busyDetector))
    expect(['pass', 'fail', 'incomplete']).toContain(body.loop.verdict)
    expect(Array.isArray(body.schedule)).toBe(true)
    expect(body.events.map((e) => e.id)).toEqual(ids('select id from events where detector_id = ? order by occurred_at desc limit 40', busyDetector))
  })

  it.each(['customers', 'sites', 'units', 'devices', 'visits'])('%s: 404 for one that does not exist, 400 for an id that is not one', async (name) => {
    const missing = await get(`/api/${name}/999999`)
    expect(missing.status).toBe(404)
    expect(((await missing.json()) as { error: string }).error).toMatch(/^No such /)
    for (const bad of ['abc', '0', '-3', '1.5']) {
      const res = await get(`/api/${name}/${bad}`)
      expect(res.status, `${name}/${bad}`).toBe(400)
      const body = (await res.json()) as { error: string; issues: Array<{ path: string }> }
      expect(body.error).toBe('Invalid id')
      expect(body.issues.length).toBeGreaterThan(0)
    }
  })
})
