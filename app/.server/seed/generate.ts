import type Database from 'better-sqlite3'
import { calendarFor, type WorkCalendar } from '~/domain/calendar'
import { addDays, daysBetween, type IsoDate } from '~/domain/dates'
import { deriveDetector, workFacts, type TaskResult } from '~/domain/derive'
import { CLEANING_INTERVAL_DAYS, nextSensitivityDue, type Environment } from '~/domain/schedule'
import type { Task } from '~/domain/vocabulary'
import {
  CITIES,
  CLOSED_DAYS,
  DEMO_USERS,
  DETECTOR_MODELS,
  MONITORING_COMPANIES,
  NAME_FIRST,
  NAME_SECOND,
  NAMED_CUSTOMERS,
  OBSERVED_HOLIDAYS,
  repeatsAWord,
  ROLES,
  SITE_SUFFIX,
  STREET_KINDS,
  STREETS,
  TECH_NOTES,
  UNIT_LOCATIONS,
  UNIT_MIX,
} from './names'
import { writeHistoryAudit } from './audit'
import { withBulkLoad } from './bulk'
import type { Awg } from '~/domain/conductors'
import { correctTerminals, expectedReadings, type Arrangement, type Reading, type Readings } from '~/domain/loop'
import { detectorRequirements } from '~/domain/requirements'

export type Scale = 'small' | 'demo' | 'stress'

// historyYears: how long ago the contractor took the program over; its records (visits, results,
// notices) begin then, and every detector's record is worked out from them. auditDays: how far back
// the audit log holds that history's entries (recent weeks are what people read it for).
export const SCALES: Record<Scale, { detectors: number; eventsPerDetector: number; customers: number; historyYears: number; auditDays: number }> = {
  small: { detectors: 200, eventsPerDetector: 10, customers: 5, historyYears: 5, auditDays: 14 },
  demo: { detectors: 10_500, eventsPerDetector: 26, customers: 40, historyYears: 5, auditDays: 28 },
  stress: { detectors: 101_000, eventsPerDetector: 21, customers: 320, historyYears: 3, auditDays: 7 },
}

/** mulberry32: a small, fast, seeded generator, so the same scale always yields the same data. */
function rng(seed: number) {
  let a = seed >>> 0
  const next = () => {
    a = (a + 0x6d2b79f5) >>> 0
    let t = a
    t = Math.imul(t ^ (t >>> 15), t | 1)
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61)
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296
  }
  return {
    next,
    int: (min: number, max: number) => min + Math.floor(next() * (max - min + 1)),
    pick: <T>(list: readonly T[]): T => list[Math.floor(next() * list.length)],
    /** One of `[item, weight]` pairs, chosen in proportion to the weights. */
    weighted: <T>(list: ReadonlyArray<readonly [T, number]>): T => {
      let roll = next() * list.reduce((sum, [, w]) => sum + w, 0)
      for (const [item, w] of list) if ((roll -= w) < 0) return item
      return list[list.length - 1][0]
    },
    chance: (p: number) => next() < p,
  }
}

export interface SeedCounts {
  customers: number
  sites: number
  units: number
  detectors: number
  events: number
  readings: number
  visits: number
  results: number
  notifications: number
  audit: number
}

const EOL_BY_MONITOR = [15_000, 4_700, 3_900, 10_000]
const DELAY_POLICIES = [0, 0, 180, 300]

/**
 * Fills an empty, migrated database with the demo scenario. Deterministic for a given scale and
 * `today`. Writes through prepared statements in one transaction per table group for speed.
 */
export function seed(sqlite: Database.Database, scale: Scale, today: IsoDate): SeedCounts {
  const cfg = SCALES[scale]
  const r = rng(0xd5c7 + cfg.detectors)
  const counts: SeedCounts = { customers: 0, sites: 0, units: 0, detectors: 0, events: 0, readings: 0, visits: 0, results: 0, notifications: 0, audit: 0 }
  const now = `${today}T12:00:00.000Z`

  const ins = (table: string, cols: string[]) =>
    sqlite.prepare(`insert into ${table} (${cols.join(',')}) values (${cols.map(() => '?').join(',')})`)

  const insRole = ins('roles', ['key', 'label', 'description'])
  const insUser = ins('users', ['id', 'email', 'name', 'role', 'active', 'regions', 'daily_capacity', 'capacity_unit', 'created_at'])
  const insMonitor = ins('monitoring_companies', ['id', 'name', 'phone', 'email', 'notify_method', 'notify_lead_minutes', 'hours', 'created_at'])
  const insModel = ins('detector_models', ['id', 'name', 'supervisory_labelled_in', 'aux_contacts', 'standby_va', 'alarm_va', 'velocity_min_fpm', 'velocity_max_fpm', 'pressure_min_in_wc', 'pressure_max_in_wc', 'sensitivity_low_pct_ft', 'sensitivity_high_pct_ft'])
  const insCustomer = ins('customers', ['id', 'name', 'kind', 'contact_name', 'contact_email', 'contact_phone', 'created_at'])
  const insSite = ins('sites', ['id', 'customer_id', 'name', 'street', 'city', 'region', 'postal_code', 'time_zone', 'jurisdiction', 'ahj_name', 'ahj_contact', 'code_basis', 'monitoring_company_id', 'monitoring_account', 'delay_policy_seconds', 'keeps_nuisance_records', 'access_notes', 'created_at'])
  const insUnit = ins('units', ['id', 'site_id', 'tag', 'kind', 'location', 'shutdown_input', 'supply_cfm', 'return_cfm', 'duct_shape', 'duct_width_in', 'duct_height_in', 'duct_diameter_in', 'storeys_served', 'storey_return_detectors', 'shared_plenum', 'area_detection', 'transformer_va', 'created_at'])
  const detectorCols = ['id', 'unit_id', 'site_id', 'customer_id', 'model_id', 'tag', 'serial', 'position', 'heads_fitted', 'housing', 'environment', 'delay_seconds', 'delay_observed_on', 'installed_on', 'eol_ohms', 'eol_placement', 'alarm_terminal', 'supervisory_terminal', 'conductor_awg', 'conductor_stranded', 'run_feet', 'test_station', 'test_station_feet', 'velocity_min_fpm', 'velocity_max_fpm', 'pressure_min_in_wc', 'pressure_max_in_wc', 'state', 'last_visual_on', 'last_functional_on', 'last_sensitivity_on', 'sensitivity_streak', 'last_cleaned_on', 'last_result', 'next_visual_on', 'next_functional_on', 'next_sensitivity_on', 'next_cleaning_on', 'next_due_on', 'due_status', 'delay_agreement', 'risk_score', 'risk_reasons', 'troubles_30d', 'loop_verdict', 'loop_findings', 'updated_at']
  const insDetector = ins('detectors', detectorCols)
  const insEvent = ins('events', ['site_id', 'detector_id', 'occurred_at', 'kind', 'detail', 'user_id'])
  const insReading = ins('readings', ['detector_id', 'visit_id', 'taken_at', 'kind', 'value', 'open', 'taken_by'])
  const insVisit = ins('visits', ['id', 'site_id', 'kind', 'scheduled_on', 'technician_id', 'status', 'notes', 'created_by', 'created_at'])
  const insVisitDetector = ins('visit_detectors', ['visit_id', 'detector_id', 'tasks', 'result', 'notes', 'completed_at'])
  const insResult = ins('task_results', ['detector_id', 'visit_id', 'task', 'done_on', 'outcome', 'value', 'recorded_by', 'created_at'])
  const insHoliday = ins('observed_holidays', ['region', 'name'])
  const insClosed = ins('closed_days', ['day', 'label'])
  const insNotice = ins('notifications', ['site_id', 'visit_id', 'monitoring_company_id', 'notified_at', 'notified_by', 'method', 'spoke_with', 'confirmation', 'in_test_from', 'in_test_until', 'site_contact_told', 'cleared_at', 'cleared_with', 'cleared_by'])

  // Each site's work goes to a technician who covers its region.
  const techsByRegion = new Map<string, number[]>()
  DEMO_USERS.forEach((u, i) => {
    if (!('regions' in u)) return
    for (const region of u.regions) techsByRegion.set(region, [...(techsByRegion.get(region) ?? []), i + 1])
  })
  const officeId = DEMO_USERS.findIndex((u) => u.role === 'office') + 1

  // The company's own closed days lie ahead of `today`, each on what would otherwise be a working day.
  const closedDays = CLOSED_DAYS.map((d) => ({ day: calendarFor('US').nextWorkingDay(addDays(today, d.after)), label: d.label }))
  // Past visits kept off weekends and the national public holidays (one calendar: reading a region's
  // holidays for every past year costs more than the rest of a small seed); planned visits also keep
  // off the site region's own holidays and the company's closed days.
  const pastCalendar = calendarFor('US')
  const calendars = new Map<string, WorkCalendar>()
  const calendarOf = (region: string) => {
    let cal = calendars.get(region)
    if (!cal) calendars.set(region, (cal = calendarFor(region, { extraClosedDays: closedDays.map((d) => d.day) })))
    return cal
  }

  sqlite.transaction(() => {
    for (const role of ROLES) insRole.run(role.key, role.label, role.description)
    DEMO_USERS.forEach((u, i) =>
      'regions' in u
        ? insUser.run(i + 1, u.email, u.name, u.role, 1, u.regions.join(','), u.dailyCapacity, 'detectors', now)
        : insUser.run(i + 1, u.email, u.name, u.role, 1, null, null, 'detectors', now),
    )
    MONITORING_COMPANIES.forEach((m, i) => insMonitor.run(i + 1, m.name, m.phone, m.email, m.method, m.lead, '24/7', now))
    DETECTOR_MODELS.forEach((m, i) =>
      insModel.run(i + 1, m.name, m.labelled, m.aux, m.standby, m.alarm, m.vmin, m.vmax, m.pmin, m.pmax, m.slow, m.shigh),
    )
    for (const d of closedDays) insClosed.run(d.day, d.label)
  })()

  // Customers: the named ones first, then generated chains up to the scale's count.
  const customerList: Array<{ id: number; name: string; kind: string; prefix: string }> = []
  const customerNames = new Set<string>(NAMED_CUSTOMERS.map((c) => c.name))
  // A generated chain's name: first word, the trade's tail, and past the first rounds a qualifier;
  // the first combination that is new and uses no word twice ("Plaza Holdings Holdings").
  const chainName = (i: number, kind: string) => {
    const first = NAME_FIRST[i % NAME_FIRST.length]
    const tails = NAME_SECOND[kind]
    const qualifiers = ['', 'West', 'East', 'Group', 'Holdings', 'North', 'South']
    const round = Math.floor(i / (NAME_FIRST.length * 3))
    for (let k = 0; k < tails.length * qualifiers.length; k++) {
      const tail = tails[(Math.floor(i / NAME_FIRST.length) + k) % tails.length]
      const qualifier = qualifiers[(round + Math.floor(k / tails.length)) % qualifiers.length]
      const name = `${first} ${tail}${qualifier ? ` ${qualifier}` : ''}`
      if (!customerNames.has(name) && !repeatsAWord(name)) return name
    }
    return `${first} ${tails[0]} ${i + 1}`
  }
  for (let i = 0; i < cfg.customers; i++) {
    const named = NAMED_CUSTOMERS[i]
    if (named) {
      customerList.push({ id: i + 1, name: named.name, kind: named.kind, prefix: named.sitePrefix })
    } else {
      const kind = r.pick(['restaurant', 'restaurant', 'retail', 'office', 'school', 'healthcare'])
      const name = chainName(i, kind)
      customerNames.add(name)
      customerList.push({ id: i + 1, name, kind, prefix: NAME_FIRST[i % NAME_FIRST.length] })
    }
  }

  let siteId = 0
  const siteNames = new Set<string>()
  const regionsUsed = new Set<string>()
  let unitId = 0
  let detectorId = 0
  let visitId = 0
  const eventsPer = cfg.eventsPerDetector

  const writeFleet = sqlite.transaction(() => {
    for (const c of customerList) {
      // The head office's line: an area code of one of the regions served, a number kept for fiction.
      const phone = `(${r.pick(CITIES).area}) 555-01${String(r.int(0, 99)).padStart(2, '0')}`
      insCustomer.run(c.id, c.name, c.kind, `${r.pick(['Dana', 'Lee', 'Sam', 'Robin', 'Jordan', 'Avery'])} ${r.pick(['Hale', 'Moreno', 'Baptiste', 'Lindqvist', 'Okafor'])}`, `facilities@${c.prefix.toLowerCase().replace(/[^a-z]+/g, '')}.test`, phone, now)
      counts.customers++
    }
    // Chains get many sites; the first customers get the most so the demo has a few big programs.
    const weights = customerList.map((_, i) => 1 / (1 + i * 0.15))
    const weightSum = weights.reduce((a, b) => a + b, 0)
    let ci = 0
    while (detectorId < cfg.detectors) {
      // Walk customers by weight so big chains collect more sites.
      const c = customerList[ci]
      ci = (ci + 1) % customerList.length
      const siteShare = weights[customerList.indexOf(c)] / weightSum
      if (!r.chance(Math.min(1, siteShare * customerList.length))) continue
      // A place and a street sharing no word with the customer's name, so no name says a word twice.
      let place = r.pick(CITIES)
      while (repeatsAWord(`${c.prefix} ${place.city}`)) place = r.pick(CITIES)
      siteId++
      const monitor = ((siteId * 7) % MONITORING_COMPANIES.length) + 1
      const policy = DELAY_POLICIES[(monitor + siteId) % DELAY_POLICIES.length]
      // Two sites in three keep a nuisance-alarm log (by id, so the random draws stay as they were).
      const keepsRecords = siteId % 3 !== 0
      const suffix = r.pick(SITE_SUFFIX[c.kind])
      const tail = `${place.city}${suffix ? ` ${suffix}` : ''}`
      let streetName = `${r.pick(STREETS)} ${r.pick(STREET_KINDS)}`
      while (repeatsAWord(`${c.prefix} ${streetName} ${tail}`)) streetName = `${r.pick(STREETS)} ${r.pick(STREET_KINDS)}`
      const number = r.int(100, 9899)
      const street = `${number} ${streetName}`
      const siteName =
        [`${c.prefix} ${tail}`, `${c.prefix} ${streetName}, ${tail}`, `${c.prefix} ${streetName}, ${tail} (${number})`].find((n) => !siteNames.has(n)) ??
        `${c.prefix} ${streetName}, ${tail} #${siteId}`
      siteNames.add(siteName)
      regionsUsed.add(place.region)
      const codeBasis = CITIES.indexOf(place) % 3 === 0 ? 'nfpa90a' : 'imc'
      insSite.run(siteId, c.id, siteName, street, place.city, place.region, `${place.zip}${String(r.int(100, 999))}`, place.tz, `City of ${place.city}`, `${place.city} Fire Prevention Bureau`, `fireprevention@${place.city.toLowerCase().replace(/[^a-z]+/g, '')}.test`, codeBasis, monitor, `AC-${String(100000 + siteId * 37).slice(-6)}`, policy, keepsRecords ? 1 : 0, r.chance(0.4) ? r.pick(['Roof hatch key at front desk.', 'Ladder on site; call manager on arrival.', 'After 14:00 only: kitchen busy at lunch.', 'Escort required in patient areas.']) : null, now)
      counts.sites++
      const siteVisits = writeSiteHistory(siteId, monitor, c.kind, place.region)

      const unitCount = c.kind === 'restaurant' ? r.int(2, 4) : c.kind === 'retail' ? r.int(3, 9) : r.int(2, 7)
      // Tags number each kind on its own, as on a roof plan: RTU-1, RTU-2, MAU-1.
      const perKind = new Map<string, number>()
      for (let u = 1; u <= unitCount && detectorId < cfg.detectors; u++) {
        unitId++
        const kind = r.weighted(UNIT_MIX[c.kind])
        perKind.set(kind, (perKind.get(kind) ?? 0) + 1)
        const unitTag = `${kind.toUpperCase()}-${perKind.get(kind)}`
        // Air handlers are the big ones; a make-up air unit brings in outdoor air only and has no return.
        const supply =
          kind === 'ahu' ? r.int(8, 60) * 500
          : kind === 'mau' ? r.int(4, 16) * 500
          : kind === 'erv' ? r.int(4, 12) * 500
          : kind === 'fcu' ? r.int(9, 12) * 200
          : r.int(3, 25) * 400
        const ret = kind === 'mau' ? 0 : Math.round(supply * (0.8 + r.next() * 0.15))
        const round = r.chance(0.2)
        // Size the duct for roughly 700–2,300 fpm, with a few outside any listing.
        const targetFpm = r.chance(0.04) ? r.int(150, 280) : r.int(700, 2300)
        const areaIn2 = (supply / targetFpm) * 144
        const width = Math.max(8, Math.round(Math.sqrt(areaIn2 * 1.5) / 2) * 2)
        const height = Math.max(6, Math.round(areaIn2 / width / 2) * 2)
        const diameter = Math.max(8, Math.round(Math.sqrt((areaIn2 * 4) / Math.PI)))
        const storeys = c.kind === 'office' && kind === 'ahu' ? r.int(1, 6) : 1
        const location = c.kind === 'restaurant' && kind === 'rtu' && r.chance(0.3) ? 'Roof over dining room' : r.pick(UNIT_LOCATIONS[kind])
        // Drawn in the order the row lists them, so the random sequence is the one it always was.
        const shutdownInput = r.chance(0.7) ? 'break-to-stop' : 'make-to-stop'
        const sharedPlenum = r.chance(0.1)
        const areaDetection = r.chance(0.15)
        const transformerVa = r.pick([40, 40, 40, 50, 75])
        // A riser that needs a detector at each storey has one at each, recorded on the unit: the demo's
        // multi-storey air handlers are meant to meet their code basis.
        const perStorey = detectorRequirements({ codeBasis, supplyCfm: supply, returnCfm: ret, storeysServed: storeys, sharedPlenum, areaDetection, installed: { supply: false, return: false } })
          .items.some((i) => i.location === 'return-each-storey' && i.required)
        insUnit.run(unitId, siteId, unitTag, kind, location, shutdownInput, supply, ret, round ? 'round' : 'rectangular', round ? null : width, round ? null : height, round ? diameter : null, storeys, perStorey ? storeys : null, sharedPlenum ? 1 : 0, areaDetection ? 1 : 0, transformerVa, now)
        counts.units++

        const positions: Array<'supply' | 'return'> = kind === 'mau' ? ['supply'] : r.chance(0.55) ? ['supply', 'return'] : [r.chance(0.6) ? 'supply' : 'return']
        for (const position of positions) {
          if (detectorId >= cfg.detectors) break
          detectorId++
          writeDetector(detectorId, { siteId, unitId, customerId: c.id, kind: c.kind, position, monitor, policy, keepsRecords, unitTag, visits: siteVisits })
        }
      }
      writePlannedVisit(siteId, place.region)
    }
  })

  interface SiteVisit {
    id: number
    site: number
    monitor: number
    on: IsoDate
    kind: 'test' | 'inspection'
    tech: number
    written: boolean
  }

  /**
   * The site's program since the contractor took it over: a visit every quarter (restaurants, for the
   * kitchen cleaning) or every half year, one a year being the annual test, on working days, mostly by
   * the site's usual technician from those covering its region. A few sites have lapsed and not been
   * visited for a year. The visits are written when a detector's work first lands on them (`writeVisit`),
   * so a round that found nothing to do leaves no visit behind.
   */
  function writeSiteHistory(site: number, monitor: number, kind: string, region: string): SiteVisit[] {
    const techs = techsByRegion.get(region) ?? []
    const usual = r.pick(techs)
    const every = kind === 'restaurant' ? 91 : 182
    const perYear = Math.round(365 / every)
    const testPhase = r.int(0, perYear - 1)
    const start = addDays(today, -cfg.historyYears * 365)
    const lapsed = r.chance(0.05)
    let on = addDays(today, lapsed ? -r.int(380, 700) : -r.int(3, every - 3))
    const dates: IsoDate[] = []
    while (on >= start) {
      // The last working day on or before the planned one.
      dates.push(pastCalendar.addWorkingDays(addDays(on, 1), -1))
      on = addDays(on, -every + r.int(-6, 6))
    }
    dates.reverse()
    return dates.map((day, k) => {
      visitId++
      const visitKind = (k + testPhase) % perYear === 0 ? 'test' : 'inspection'
      return { id: visitId, site, monitor, on: day, kind: visitKind, tech: r.chance(0.8) ? usual : r.pick(techs), written: false }
    })
  }

  /** A past visit with its notice to the monitoring company, logged and cleared. */
  function writeVisit(v: SiteVisit) {
    v.written = true
    const m = MONITORING_COMPANIES[v.monitor - 1]
    insVisit.run(v.id, v.site, v.kind, v.on, v.tech, 'done', v.kind === 'test' ? 'Annual test, inspection and cleaning.' : 'Inspection and cleaning round.', officeId, `${addDays(v.on, -14)}T15:00:00.000Z`)
    counts.visits++
    const spoke = r.pick(['Operator 14', 'Dispatcher Ruiz', 'Desk K. Amani', 'Operator 7'])
    const confirmation = `CF${String(v.id * 91 + 10000).slice(-5)}`
    insNotice.run(v.site, v.id, v.monitor, `${v.on}T14:05:00.000Z`, v.tech, m.method, spoke, confirmation, `${v.on}T14:10:00.000Z`, `${v.on}T18:10:00.000Z`, 'Manager on duty', `${v.on}T18:02:00.000Z`, spoke, v.tech)
    counts.notifications++
    // The notice's own entry in the site's timeline: one per logged notice, so counts and timeline agree.
    insEvent.run(v.site, null, `${v.on}T14:05:00.000Z`, 'notice', `Monitoring company told (${spoke}, confirmation ${confirmation}); system in test`, v.tech)
    counts.events++
  }

  function writeDetector(
    id: number,
    o: { siteId: number; unitId: number; customerId: number; kind: string; position: 'supply' | 'return'; monitor: number; policy: number; keepsRecords: boolean; unitTag: string; visits: SiteVisit[] },
  ) {
    const env: Environment =
      o.kind === 'restaurant' && r.chance(0.45)
        ? 'kitchen'
        : o.kind === 'healthcare' || r.chance(0.1)
          ? r.chance(0.5) ? 'humid' : 'clean'
          : o.kind === 'retail' && r.chance(0.25)
            ? 'dusty'
            : 'clean'
    const housing = env === 'humid' ? (r.chance(0.55) ? 'nema4x' : 'standard') : r.chance(0.04) ? 'nema4' : 'standard'
    // A NEMA 4X location gets the module built in that housing; elsewhere the usual mix of the
    // low-flow, dual-head, relay-board and plain modules (a NEMA 4 spot has its own enclosure).
    const modelIdx = housing === 'nema4x' ? 4 : r.chance(0.08) ? 3 : r.chance(0.3) ? 2 : r.chance(0.5) ? 1 : 0
    const model = DETECTOR_MODELS[modelIdx]
    const installedOn = addDays(today, -r.int(400, 6000))
    // Left out of the rounds (no access, unit replaced, never added to the list): the common way a
    // miswire goes uncaught. Some were left out from the start and have no result on record at all.
    const skipped = r.chance(0.12)
    const skippedFrom = skipped ? (r.chance(0.3) ? '0000-01-01' : addDays(today, -r.int(380, 900))) : '9999-12-31'

    // About one in twenty-five carries an installation miswire.
    const miswire = r.chance(0.04) ? r.pick(['alarm-nc', 'eol-across', 'sup-wrong', 'eol-missing', 'eol-wrong'] as const) : null
    const eol = EOL_BY_MONITOR[o.monitor - 1]
    const awg = r.pick([18, 18, 16, 14])
    const stranded = r.chance(0.7)
    const runFeet = r.int(40, 900)
    const delay = r.chance(0.1) ? null : r.chance(0.08) ? DELAY_POLICIES[(o.monitor + 1) % 4] === o.policy ? (o.policy === 0 ? 180 : 0) : DELAY_POLICIES[(o.monitor + 1) % 4] : o.policy
    const troubles30 = env === 'humid' && housing === 'standard' ? r.int(0, 4) : r.chance(0.03) ? r.int(1, 3) : 0
    const state = troubles30 > 2 || r.chance(0.025) ? 'trouble' : r.chance(0.003) ? 'supervisory' : r.chance(0.004) ? 'out-of-service' : 'normal'
    const recorded: Arrangement = {
      eolOhms: eol,
      eolPlacement: miswire === 'eol-across' ? 'across-pair' : 'through-supervisory',
      alarmTerminal: miswire === 'alarm-nc' ? 'NC' : 'NO',
      // The supervisory contact belongs on the terminal closed in normal for the model's labelling.
      supervisoryTerminal: miswire === 'sup-wrong' ? (correctTerminals(model.labelled).supervisoryTerminal === 'NO' ? 'NC' : 'NO') : correctTerminals(model.labelled).supervisoryTerminal,
      supervisoryLabelledIn: model.labelled,
      conductor: { awg: awg as Awg, stranded, oneWayFeet: runFeet },
      measuredAt: 'panel',
    }

    // History first: the work done at each of the site's visits, in order, each task deciding from
    // the results so far whether it was due.
    const results: Array<TaskResult & { visitId: number; tech: number; value: number | null }> = []
    const worked = o.visits.filter((v) => v.on >= installedOn && v.on < skippedFrom)
    const cleaningDays = CLEANING_INTERVAL_DAYS[env]
    const lastTestVisit = [...worked].reverse().find((v) => v.kind === 'test')
    const visitsDone: Array<{ visit: SiteVisit; tasks: Task[]; failed: boolean }> = []
    for (const v of worked) {
      if (!v.written) writeVisit(v)
      const facts = workFacts(results, installedOn)
      const tasks: Task[] = ['visual']
      if (v.kind === 'test') tasks.push('functional')
      const sensitivityDue = nextSensitivityDue({ installedOn, environment: env, ...facts, nuisanceRecordsKept: o.keepsRecords }).dueOn
      if (v.kind === 'test' && sensitivityDue <= addDays(v.on, 60)) tasks.push('sensitivity')
      if (v.kind === 'test' || !facts.lastCleanedOn || addDays(facts.lastCleanedOn, cleaningDays) <= addDays(v.on, 45)) tasks.push('cleaning')
      let failed = false
      for (const task of tasks) {
        // Miswired loops fail the latest functional test; a few others fail on their own.
        const fails =
          task === 'functional' ? v === lastTestVisit && (miswire !== null || r.chance(0.015))
          : task === 'sensitivity' ? r.chance(0.015)
          : task === 'visual' ? r.chance(0.01)
          : false
        failed ||= fails
        const value = task === 'sensitivity' ? Math.round((fails ? r.pick([0.4, 4.6]) : 1 + r.next() * 2) * 100) / 100 : null
        results.push({ task, doneOn: v.on, outcome: fails ? 'fail' : 'pass', visitId: v.id, tech: v.tech, value })
      }
      visitsDone.push({ visit: v, tasks, failed })
    }
    const facts = workFacts(results)
    const readings = facts.lastFunctionalOn ? meterReadings(recorded, miswire) : null

    // Trouble reports: a few recent ones feed the repeated-trouble reason; older ones are history.
    const recentTroubleTimes = Array.from({ length: troubles30 }, () => `${addDays(today, -r.int(1, 29))}T0${r.int(0, 9)}:15:00.000Z`)
    if (state === 'trouble' && troubles30 === 0) recentTroubleTimes.push(`${addDays(today, -r.int(0, 6))}T${String(r.int(10, 23))}:${String(r.int(10, 59))}:00.000Z`)
    const derived = deriveDetector(
      { installedOn, environment: env, housing, state, delaySeconds: delay, cleaningIntervalDays: null, arrangement: recorded },
      { delayPolicySeconds: o.policy, nuisanceRecordsKept: o.keepsRecords },
      { results, loopReadings: readings ?? {}, troubles: recentTroubleTimes },
      today,
    ).stored

    insDetector.run(
      id, o.unitId, o.siteId, o.customerId, modelIdx + 1,
      `${o.unitTag}-${o.position === 'supply' ? 'S' : 'R'}`, `DK${String(1_000_000 + id * 13).slice(-7)}`,
      o.position, model.heads, housing, env, delay, delay === null ? null : facts.lastVisualOn, installedOn,
      recorded.eolOhms, recorded.eolPlacement, recorded.alarmTerminal, recorded.supervisoryTerminal,
      awg, stranded ? 1 : 0, runFeet, r.chance(0.3) ? (r.chance(0.5) ? 'key' : 'magnet') : 'none', r.chance(0.3) ? r.int(20, 300) : null,
      model.vmin, model.vmax, model.pmin, model.pmax, state,
      derived.lastVisualOn, derived.lastFunctionalOn, derived.lastSensitivityOn, derived.sensitivityStreak, derived.lastCleanedOn, derived.lastResult,
      derived.nextVisualOn, derived.nextFunctionalOn, derived.nextSensitivityOn, derived.nextCleaningOn,
      derived.nextDueOn, derived.dueStatus, derived.delayAgreement, derived.riskScore, derived.riskReasons, derived.troubles30d,
      derived.loopVerdict, derived.loopFindings, now,
    )
    counts.detectors++

    for (const res of results) {
      insResult.run(id, res.visitId, res.task, res.doneOn, res.outcome, res.value, res.tech, `${res.doneOn}T18:00:00.000Z`)
      counts.results++
    }
    for (const { visit, tasks, failed } of visitsDone) {
      const at = `${visit.on}T${String(r.int(15, 17))}:${String(r.int(10, 59))}:00.000Z`
      insVisitDetector.run(visit.id, id, tasks.join(','), failed ? 'fail' : 'pass', null, at)
      const tested = tasks.includes('functional') || tasks.includes('sensitivity')
      const names = tasks.map((t) => ({ visual: 'visual inspection', functional: 'functional test', sensitivity: 'sensitivity test', cleaning: 'cleaning' })[t])
      const done = names.length > 1 ? `${names.slice(0, -1).join(', ')} and ${names.at(-1)}` : names[0]
      const detail = `${done[0].toUpperCase()}${done.slice(1)}: ${failed ? 'failed, see the visit' : 'passed'}${tasks.includes('cleaning') ? `. ${r.pick(TECH_NOTES)}` : ''}`
      insEvent.run(o.siteId, id, at, tested || !tasks.includes('cleaning') ? 'test' : 'cleaning', detail, visit.tech)
      counts.events++
    }
    if (facts.lastFunctionalOn && readings) {
      const visit = visitsDone.find((v) => v.visit.on === facts.lastFunctionalOn)!.visit
      writeReadings(id, visit, readings)
    }
    writeEvents(id, o.siteId, installedOn, recentTroubleTimes, Math.max(0, eventsPer - visitsDone.length - 1))
  }

  /** What a meter at the panel would show: the recorded wiring, or the real fault where the record hides one. */
  function meterReadings(recorded: Arrangement, miswire: string | null): Readings {
    const actual = miswire === 'eol-wrong' ? { ...recorded, eolOhms: recorded.eolOhms === 15_000 ? 4_700 : 15_000 } : recorded
    const expected = expectedReadings(actual)
    const jitter = (n: number, spread: number) => Math.round(n * (1 + (r.next() - 0.5) * spread) * 10) / 10
    const out: Readings = {}
    for (const s of ['normal', 'alarm', 'trouble'] as const) {
      const e = expected[s]
      out[s] = 'open' in e ? 'open' : e.min === 0 ? jitter(e.ohms + r.next() * 3, 0.05) : Math.round(jitter(e.ohms, 0.04))
    }
    if (miswire === 'eol-missing') out.normal = 'open'
    return out
  }

  function writeReadings(id: number, visit: SiteVisit, loop: Readings) {
    const at = `${visit.on}T${String(r.int(15, 17))}:${String(r.int(0, 59)).padStart(2, '0')}:00.000Z`
    const put = (kind: string, value: number | 'open') => {
      insReading.run(id, visit.id, at, kind, value === 'open' ? null : value, value === 'open' ? 1 : 0, visit.tech)
      counts.readings++
    }
    put('loop-normal', loop.normal as Reading)
    put('loop-alarm', loop.alarm as Reading)
    put('loop-trouble', loop.trouble as Reading)
    put('velocity', r.int(450, 2600))
    put('pressure', Math.round((0.05 + r.next() * 0.6) * 100) / 100)
  }

  const troubleDetails = ['Dirty head reported', 'Cover tamper opened', 'Loss of power at module', 'Water in sampling tube', 'Head missing']
  /** What the panel reported over the years (troubles, restores, alarms, resets), apart from the work. */
  function writeEvents(detector: number, site: number, installedOn: IsoDate, recentTroubles: string[], n: number) {
    const horizon = Math.min(1800, daysBetween(installedOn, today))
    for (let i = 0; i < n && horizon > 31; i++) {
      const daysAgo = r.int(31, horizon)
      const t = `${addDays(today, -daysAgo)}T${String(r.int(0, 23)).padStart(2, '0')}:${String(r.int(0, 59)).padStart(2, '0')}:${String(r.int(0, 59)).padStart(2, '0')}.000Z`
      const roll = r.next()
      const kind = roll < 0.4 ? 'trouble' : roll < 0.75 ? 'restore' : roll < 0.87 ? 'reset' : roll < 0.94 ? 'change' : roll < 0.98 ? 'supervisory' : 'alarm'
      const detail =
        kind === 'trouble' ? r.pick(troubleDetails)
        : kind === 'alarm' ? 'Alarm at panel; cleared, no fire found'
        : kind === 'change' ? 'Record updated'
        : kind === 'restore' ? 'Trouble cleared at the panel'
        : kind === 'reset' ? 'Detector reset after test'
        : 'Supervisory at panel; cleared'
      insEvent.run(site, detector, t, kind, detail, null)
      counts.events++
    }
    for (const t of recentTroubles) {
      insEvent.run(site, detector, t, 'trouble', r.pick(troubleDetails), null)
      counts.events++
    }
  }

  /**
   * An upcoming visit for part of the sites, on a working day at the site, covering their detectors that
   * fall due soon (none due, no visit), most already given to a technician of the region.
   */
  const dueAtSite = sqlite.prepare('select id from detectors where site_id = ? and next_due_on <= ? order by id')
  function writePlannedVisit(site: number, region: string) {
    if (!r.chance(0.35)) return
    const when = calendarOf(region).nextWorkingDay(addDays(today, r.int(1, 45)))
    const kind = r.chance(0.3) ? 'cleaning' : 'test'
    const tech = r.chance(0.85) ? r.pick(techsByRegion.get(region) ?? []) : null
    const rows = dueAtSite.all(site, addDays(when, 30)) as Array<{ id: number }>
    if (rows.length === 0) return
    visitId++
    insVisit.run(visitId, site, kind, when, tech, 'planned', null, officeId, now)
    const tasks = kind === 'cleaning' ? 'visual,cleaning' : 'visual,functional,cleaning'
    for (const row of rows) insVisitDetector.run(visitId, row.id, tasks, 'pending', null, null)
    counts.visits++
  }

  /** The company calendar: the holidays it observes in every region it works in. */
  function writeObservedHolidays() {
    for (const region of [...regionsUsed].sort()) for (const name of OBSERVED_HOLIDAYS) insHoliday.run(region, name)
  }

  withBulkLoad(sqlite, ['events', 'readings', 'visits', 'visit_detectors', 'task_results', 'notifications'], writeFleet)
  sqlite.transaction(writeObservedHolidays)()
  counts.audit = writeHistoryAudit(sqlite, today, cfg.auditDays)
  // Every detector's facts were derived for `today` above: the refresh starts from there.
  sqlite.prepare("insert into app_state (key, value) values ('derived-day', ?) on conflict(key) do update set value = excluded.value").run(today)
  return counts
}
