import type Database from 'better-sqlite3'
import { addDays, daysBetween, type IsoDate } from '~/domain/dates'
import { deriveDetector, workFacts, type TaskResult } from '~/domain/derive'
import { CLEANING_INTERVAL_DAYS, nextSensitivityDue, type Environment } from '~/domain/schedule'
import type { Task } from '~/domain/vocabulary'
import {
  CITIES,
  DEMO_USERS,
  DETECTOR_MODELS,
  MONITORING_COMPANIES,
  NAME_FIRST,
  NAME_SECOND,
  NAMED_CUSTOMERS,
  ROLES,
  SITE_SUFFIX,
  STREET_KINDS,
  STREETS,
  TECH_NOTES,
} from './names'
import { withBulkLoad } from './bulk'
import type { Awg } from '~/domain/conductors'
import { correctTerminals, expectedReadings, type Arrangement, type Reading, type Readings } from '~/domain/loop'

export type Scale = 'small' | 'demo' | 'stress'

// historyYears: how long ago the contractor took the program over; its records (visits, results,
// notices) begin then, and every detector's record is worked out from them.
export const SCALES: Record<Scale, { detectors: number; eventsPerDetector: number; customers: number; historyYears: number }> = {
  small: { detectors: 200, eventsPerDetector: 10, customers: 5, historyYears: 5 },
  demo: { detectors: 10_500, eventsPerDetector: 26, customers: 40, historyYears: 5 },
  stress: { detectors: 101_000, eventsPerDetector: 21, customers: 320, historyYears: 3 },
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
  const counts: SeedCounts = { customers: 0, sites: 0, units: 0, detectors: 0, events: 0, readings: 0, visits: 0, results: 0, notifications: 0 }
  const now = `${today}T12:00:00.000Z`

  const ins = (table: string, cols: string[]) =>
    sqlite.prepare(`insert into ${table} (${cols.join(',')}) values (${cols.map(() => '?').join(',')})`)

  const insRole = ins('roles', ['key', 'label', 'description'])
  const insUser = ins('users', ['id', 'email', 'name', 'role', 'active', 'created_at'])
  const insMonitor = ins('monitoring_companies', ['id', 'name', 'phone', 'email', 'notify_method', 'notify_lead_minutes', 'hours', 'created_at'])
  const insModel = ins('detector_models', ['id', 'name', 'supervisory_labelled_in', 'aux_contacts', 'standby_va', 'alarm_va', 'velocity_min_fpm', 'velocity_max_fpm', 'pressure_min_in_wc', 'pressure_max_in_wc'])
  const insCustomer = ins('customers', ['id', 'name', 'kind', 'contact_name', 'contact_email', 'contact_phone', 'created_at'])
  const insSite = ins('sites', ['id', 'customer_id', 'name', 'street', 'city', 'region', 'postal_code', 'time_zone', 'jurisdiction', 'ahj_name', 'ahj_contact', 'code_basis', 'monitoring_company_id', 'monitoring_account', 'delay_policy_seconds', 'access_notes', 'created_at'])
  const insUnit = ins('units', ['id', 'site_id', 'tag', 'kind', 'location', 'shutdown_input', 'supply_cfm', 'return_cfm', 'duct_shape', 'duct_width_in', 'duct_height_in', 'duct_diameter_in', 'storeys_served', 'shared_plenum', 'area_detection', 'transformer_va', 'created_at'])
  const detectorCols = ['id', 'unit_id', 'site_id', 'customer_id', 'model_id', 'tag', 'serial', 'position', 'heads_fitted', 'housing', 'environment', 'delay_seconds', 'delay_observed_on', 'installed_on', 'eol_ohms', 'eol_placement', 'alarm_terminal', 'supervisory_terminal', 'conductor_awg', 'conductor_stranded', 'run_feet', 'test_station', 'test_station_feet', 'velocity_min_fpm', 'velocity_max_fpm', 'pressure_min_in_wc', 'pressure_max_in_wc', 'state', 'last_visual_on', 'last_functional_on', 'last_sensitivity_on', 'sensitivity_streak', 'last_cleaned_on', 'last_result', 'next_visual_on', 'next_functional_on', 'next_sensitivity_on', 'next_cleaning_on', 'next_due_on', 'due_status', 'delay_agreement', 'risk_score', 'risk_reasons', 'troubles_30d', 'loop_verdict', 'loop_findings', 'updated_at']
  const insDetector = ins('detectors', detectorCols)
  const insEvent = ins('events', ['site_id', 'detector_id', 'occurred_at', 'kind', 'detail', 'user_id'])
  const insReading = ins('readings', ['detector_id', 'visit_id', 'taken_at', 'kind', 'value', 'open', 'taken_by'])
  const insVisit = ins('visits', ['id', 'site_id', 'kind', 'scheduled_on', 'technician_id', 'status', 'notes', 'created_by', 'created_at'])
  const insVisitDetector = ins('visit_detectors', ['visit_id', 'detector_id', 'tasks', 'result', 'notes', 'completed_at'])
  const insResult = ins('task_results', ['detector_id', 'visit_id', 'task', 'done_on', 'outcome', 'value', 'recorded_by', 'created_at'])
  const insNotice = ins('notifications', ['site_id', 'visit_id', 'monitoring_company_id', 'notified_at', 'notified_by', 'method', 'spoke_with', 'confirmation', 'in_test_from', 'in_test_until', 'site_contact_told', 'cleared_at'])

  const techIds = DEMO_USERS.map((u, i) => ({ ...u, id: i + 1 }))
    .filter((u) => u.role === 'technician')
    .map((u) => u.id)
  const officeId = DEMO_USERS.findIndex((u) => u.role === 'office') + 1

  sqlite.transaction(() => {
    for (const role of ROLES) insRole.run(role.key, role.label, role.description)
    DEMO_USERS.forEach((u, i) => insUser.run(i + 1, u.email, u.name, u.role, 1, now))
    MONITORING_COMPANIES.forEach((m, i) => insMonitor.run(i + 1, m.name, m.phone, m.email, m.method, m.lead, '24/7', now))
    DETECTOR_MODELS.forEach((m, i) =>
      insModel.run(i + 1, m.name, m.labelled, 2, m.standby, m.alarm, m.vmin, m.vmax, m.pmin, m.pmax),
    )
  })()

  // Customers: the named ones first, then generated chains up to the scale's count.
  const customerList: Array<{ id: number; name: string; kind: string; prefix: string }> = []
  for (let i = 0; i < cfg.customers; i++) {
    const named = NAMED_CUSTOMERS[i]
    if (named) {
      customerList.push({ id: i + 1, name: named.name, kind: named.kind, prefix: named.sitePrefix })
    } else {
      const kind = r.pick(['restaurant', 'restaurant', 'retail', 'office', 'school', 'healthcare'])
      const first = NAME_FIRST[i % NAME_FIRST.length]
      const tail = NAME_SECOND[kind][Math.floor(i / NAME_FIRST.length) % NAME_SECOND[kind].length]
      const round = Math.floor(i / (NAME_FIRST.length * 3))
      const name = `${first} ${tail}${round > 0 ? ` ${['', 'West', 'East', 'Group', 'Holdings'][round % 5]}` : ''}`.trim()
      customerList.push({ id: i + 1, name, kind, prefix: first })
    }
  }

  let siteId = 0
  const siteNames = new Set<string>()
  let unitId = 0
  let detectorId = 0
  let visitId = 0
  const eventsPer = cfg.eventsPerDetector

  const writeFleet = sqlite.transaction(() => {
    for (const c of customerList) {
      insCustomer.run(c.id, c.name, c.kind, `${r.pick(['Dana', 'Lee', 'Sam', 'Robin', 'Jordan', 'Avery'])} ${r.pick(['Hale', 'Moreno', 'Baptiste', 'Lindqvist', 'Okafor'])}`, `facilities@${c.prefix.toLowerCase().replace(/[^a-z]+/g, '')}.test`, `555-01${String(r.int(0, 99)).padStart(2, '0')}`, now)
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
      const place = r.pick(CITIES)
      siteId++
      const monitor = ((siteId * 7) % MONITORING_COMPANIES.length) + 1
      const policy = DELAY_POLICIES[(monitor + siteId) % DELAY_POLICIES.length]
      const suffix = r.pick(SITE_SUFFIX[c.kind])
      const streetName = `${r.pick(STREETS)} ${r.pick(STREET_KINDS)}`
      const street = `${r.int(100, 9899)} ${streetName}`
      let siteName = `${c.prefix} ${place.city}${suffix ? ` ${suffix}` : ''}`
      if (siteNames.has(siteName)) siteName = `${c.prefix} ${streetName}, ${place.city}${suffix ? ` ${suffix}` : ''}`
      if (siteNames.has(siteName)) siteName = `${siteName} (${street.split(' ')[0]})`
      siteNames.add(siteName)
      const codeBasis = CITIES.indexOf(place) % 3 === 0 ? 'nfpa90a' : 'imc'
      insSite.run(siteId, c.id, siteName, street, place.city, place.region, `${place.zip}${String(r.int(100, 999))}`, place.tz, `City of ${place.city}`, `${place.city} Fire Prevention Bureau`, `fireprevention@${place.city.toLowerCase().replace(/[^a-z]+/g, '')}.test`, codeBasis, monitor, `AC-${String(100000 + siteId * 37).slice(-6)}`, policy, r.chance(0.4) ? r.pick(['Roof hatch key at front desk.', 'Ladder on site; call manager on arrival.', 'After 14:00 only: kitchen busy at lunch.', 'Escort required in patient areas.']) : null, now)
      counts.sites++
      const siteVisits = writeSiteHistory(siteId, monitor, c.kind)

      const unitCount = c.kind === 'restaurant' ? r.int(2, 4) : c.kind === 'retail' ? r.int(3, 9) : r.int(2, 7)
      for (let u = 1; u <= unitCount && detectorId < cfg.detectors; u++) {
        unitId++
        const isAhu = c.kind !== 'restaurant' && r.chance(0.35)
        const supply = isAhu ? r.int(8, 60) * 500 : r.int(3, 25) * 400
        const ret = Math.round(supply * (0.8 + r.next() * 0.15))
        const round = r.chance(0.2)
        // Size the duct for roughly 700–2,300 fpm, with a few outside any listing.
        const targetFpm = r.chance(0.04) ? r.int(150, 280) : r.int(700, 2300)
        const areaIn2 = (supply / targetFpm) * 144
        const width = Math.max(8, Math.round(Math.sqrt(areaIn2 * 1.5) / 2) * 2)
        const height = Math.max(6, Math.round(areaIn2 / width / 2) * 2)
        const diameter = Math.max(8, Math.round(Math.sqrt((areaIn2 * 4) / Math.PI)))
        const storeys = c.kind === 'office' && isAhu ? r.int(1, 6) : 1
        insUnit.run(unitId, siteId, `${isAhu ? 'AHU' : 'RTU'}-${u}`, isAhu ? 'ahu' : r.chance(0.1) ? 'mau' : 'rtu', isAhu ? r.pick(['Mechanical room', 'Penthouse', 'Level 2 plant']) : r.pick(['Roof, north', 'Roof, south', 'Roof over kitchen', 'Roof, east']), r.chance(0.7) ? 'break-to-stop' : 'make-to-stop', supply, ret, round ? 'round' : 'rectangular', round ? null : width, round ? null : height, round ? diameter : null, storeys, r.chance(0.1) ? 1 : 0, r.chance(0.15) ? 1 : 0, r.pick([40, 40, 40, 50, 75]), now)
        counts.units++

        const positions: Array<'supply' | 'return'> = r.chance(0.55) ? ['supply', 'return'] : [r.chance(0.6) ? 'supply' : 'return']
        for (const position of positions) {
          if (detectorId >= cfg.detectors) break
          detectorId++
          writeDetector(detectorId, { siteId, unitId, customerId: c.id, kind: c.kind, position, monitor, policy, unitTag: `${isAhu ? 'AHU' : 'RTU'}-${u}`, visits: siteVisits })
        }
      }
      writePlannedVisit(siteId)
    }
  })

  interface SiteVisit {
    id: number
    on: IsoDate
    kind: 'test' | 'inspection'
    tech: number
  }

  /**
   * The site's program since the contractor took it over: a visit every quarter (restaurants, for the
   * kitchen cleaning) or every half year, one a year being the annual test, each with its notice to
   * the monitoring company logged and cleared. A few sites have lapsed and not been visited for a year.
   */
  function writeSiteHistory(site: number, monitor: number, kind: string): SiteVisit[] {
    const m = MONITORING_COMPANIES[monitor - 1]
    const every = kind === 'restaurant' ? 91 : 182
    const perYear = Math.round(365 / every)
    const testPhase = r.int(0, perYear - 1)
    const start = addDays(today, -cfg.historyYears * 365)
    const lapsed = r.chance(0.05)
    let on = addDays(today, lapsed ? -r.int(380, 700) : -r.int(3, every - 3))
    const dates: IsoDate[] = []
    while (on >= start) {
      dates.push(on)
      on = addDays(on, -every + r.int(-6, 6))
    }
    dates.reverse()
    const out: SiteVisit[] = []
    dates.forEach((day, k) => {
      visitId++
      const tech = r.pick(techIds)
      const visitKind = (k + testPhase) % perYear === 0 ? 'test' : 'inspection'
      insVisit.run(visitId, site, visitKind, day, tech, 'done', visitKind === 'test' ? 'Annual test, inspection and cleaning.' : 'Inspection and cleaning round.', officeId, `${addDays(day, -14)}T15:00:00.000Z`)
      counts.visits++
      const spoke = r.pick(['Operator 14', 'Dispatcher Ruiz', 'Desk K. Amani', 'Operator 7'])
      const confirmation = `CF${String(visitId * 91 + 10000).slice(-5)}`
      insNotice.run(site, visitId, monitor, `${day}T14:05:00.000Z`, tech, m.method, spoke, confirmation, `${day}T14:10:00.000Z`, `${day}T18:10:00.000Z`, 'Manager on duty', `${day}T18:02:00.000Z`)
      counts.notifications++
      // The notice's own entry in the site's timeline: one per logged notice, so counts and timeline agree.
      insEvent.run(site, null, `${day}T14:05:00.000Z`, 'notice', `Monitoring company told (${spoke}, confirmation ${confirmation}); system in test`, tech)
      counts.events++
      out.push({ id: visitId, on: day, kind: visitKind, tech })
    })
    return out
  }

  function writeDetector(
    id: number,
    o: { siteId: number; unitId: number; customerId: number; kind: string; position: 'supply' | 'return'; monitor: number; policy: number; unitTag: string; visits: SiteVisit[] },
  ) {
    const modelIdx = r.chance(0.08) ? 2 : r.chance(0.3) ? 1 : 0
    const model = DETECTOR_MODELS[modelIdx]
    const env: Environment =
      o.kind === 'restaurant' && r.chance(0.45)
        ? 'kitchen'
        : o.kind === 'healthcare' || r.chance(0.1)
          ? r.chance(0.5) ? 'humid' : 'clean'
          : o.kind === 'retail' && r.chance(0.25)
            ? 'dusty'
            : 'clean'
    const housing = env === 'humid' ? (r.chance(0.55) ? 'nema4x' : 'standard') : r.chance(0.04) ? 'nema4' : 'standard'
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
      const facts = workFacts(results)
      const tasks: Task[] = ['visual']
      if (v.kind === 'test') tasks.push('functional')
      const sensitivityDue = nextSensitivityDue({ installedOn, environment: env, ...facts }).dueOn
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
      { delayPolicySeconds: o.policy },
      { results, loopReadings: readings ?? {}, troubles: recentTroubleTimes },
      today,
    ).stored

    insDetector.run(
      id, o.unitId, o.siteId, o.customerId, modelIdx + 1,
      `${o.unitTag}-${o.position === 'supply' ? 'S' : 'R'}`, `DK${String(1_000_000 + id * 13).slice(-7)}`,
      o.position, modelIdx === 1 ? 2 : 1, housing, env, delay, delay === null ? null : facts.lastVisualOn, installedOn,
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

  /** An upcoming visit for part of the sites, covering their detectors that fall due soon. */
  function writePlannedVisit(site: number) {
    if (!r.chance(0.35)) return
    const when = addDays(today, r.int(1, 45))
    visitId++
    insVisit.run(visitId, site, r.chance(0.3) ? 'cleaning' : 'test', when, r.chance(0.85) ? r.pick(techIds) : null, 'planned', null, officeId, now)
    const rows = sqlite.prepare('select id from detectors where site_id = ? and next_due_on <= ?').all(site, addDays(when, 30)) as Array<{ id: number }>
    for (const row of rows) insVisitDetector.run(visitId, row.id, 'visual,functional,cleaning', 'pending', null, null)
    counts.visits++
  }

  withBulkLoad(sqlite, ['events', 'readings', 'visits', 'visit_detectors', 'task_results', 'notifications'], writeFleet)
  // Every detector's facts were derived for `today` above: the refresh starts from there.
  sqlite.prepare("insert into app_state (key, value) values ('derived-day', ?) on conflict(key) do update set value = excluded.value").run(today)
  return counts
}
