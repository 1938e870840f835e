import { noticeColumns } from './notice-columns'
import { and, asc, count, desc, eq, gte, inArray, lte } from 'drizzle-orm'
import { alias } from 'drizzle-orm/sqlite-core'
import { z } from 'zod'
import { checkPressure, type RangeStatus } from '~/domain/airflow'
import type { DetectorState } from '~/domain/contacts'
import { diagnose, expectedCorrect, type Expected, type Readings } from '~/domain/loop'
import type { Db } from '../db'
import { arrangementColumns, arrangementOf } from '../derivation'
import { env } from '../env'
import {
  customers,
  detectorModels,
  detectors,
  monitoringCompanies,
  notifications,
  readings,
  sites,
  taskResults,
  units,
  users,
  visitDetectors,
  visits,
} from '../schema'
import { byTag } from './statements'

/** The contractor named on every printed record. */
const companyName = () => env.COMPANY_NAME

// A year of visits at one site is a handful; the cap keeps a mistyped period from building a book.
const PERIOD_VISITS_CAP = 60

const technician = alias(users, 'technician')
const notifier = alias(users, 'notifier')
const clearer = alias(users, 'clearer')

const LOOP_KINDS = { 'loop-normal': 'normal', 'loop-alarm': 'alarm', 'loop-trouble': 'trouble', 'loop-unpowered': 'unpowered' } as const
type LoopKind = keyof typeof LOOP_KINDS

const FINDING_LABELS: Record<string, string> = {
  signalAtPanel: 'Signal received at the panel',
  unitShutDown: 'Unit shut down on alarm',
  resetOk: 'Detector reset',
  delaySecondsFound: 'Delay as found (s)',
  testStationWorked: 'Remote test station tripped the detector',
  testStationReset: 'Remote test station reset it',
  heads: 'Each head',
  headsFitted: 'Heads fitted',
  cleaned: 'Cleaned',
}
const findingsShape = z.record(z.string(), z.unknown())

const yesNo = (b: unknown) => (b === true ? 'yes' : b === false ? 'no' : 'not recorded')
/** A two-head module's results, head by head, in words. */
const headWords = (heads: unknown[]) =>
  heads
    .map((h) => h as { head?: number; tripped?: boolean; cleaned?: boolean })
    .map((h) => `Head ${h.head}: alarm on test ${yesNo(h.tripped)}, cleaned ${yesNo(h.cleaned)}`)
    .join('; ')

/** Who read the loop at the panel (the fire alarm contractor's person and firm), printed with the loop readings. */
function loopReadBy(raw: unknown): string | null {
  const parsed = findingsShape.safeParse(raw)
  const v = parsed.success ? parsed.data.loopReadBy : undefined
  return typeof v === 'string' && v.trim() ? v.trim() : null
}

function findingRows(raw: unknown): Array<{ label: string; value: string }> {
  const parsed = findingsShape.safeParse(raw)
  if (!parsed.success) return []
  return Object.entries(parsed.data)
    .filter(([k, v]) => k !== 'loopReadBy' && v !== null && v !== undefined && v !== '')
    .map(([k, v]) => ({
      label: FINDING_LABELS[k] ?? k.replace(/([A-Z])/g, ' $1').replace(/^./, (c) => c.toUpperCase()),
      value: k === 'heads' && Array.isArray(v) ? headWords(v) : typeof v === 'boolean' ? (v ? 'Yes' : 'No') : typeof v === 'object' ? JSON.stringify(v) : String(v),
    }))
}

const siteColumns = {
  id: sites.id,
  name: sites.name,
  street: sites.street,
  city: sites.city,
  region: sites.region,
  postalCode: sites.postalCode,
  timeZone: sites.timeZone,
  jurisdiction: sites.jurisdiction,
  ahjName: sites.ahjName,
  monitoringAccount: sites.monitoringAccount,
  customer: customers.name,
  monitoring: monitoringCompanies.name,
}

function siteHead(db: Db, siteId: number) {
  return (
    db
      .select(siteColumns)
      .from(sites)
      .innerJoin(customers, eq(customers.id, sites.customerId))
      .leftJoin(monitoringCompanies, eq(monitoringCompanies.id, sites.monitoringCompanyId))
      .where(eq(sites.id, siteId))
      .get() ?? null
  )
}
export type RecordSite = NonNullable<ReturnType<typeof siteHead>>

type LoopRow = { state: DetectorState; reading: number | 'open'; expected: Expected; inRange: boolean }
type Measure = { what: string; value: number; unit: string; min: number | null; max: number | null; status: RangeStatus | 'no-listing' }

// Node 20 has no Map.groupBy.
function groupBy<T, K>(items: readonly T[], keyOf: (item: T) => K): Map<K, T[]> {
  const out = new Map<K, T[]>()
  for (const item of items) {
    const k = keyOf(item)
    const list = out.get(k)
    if (list) list.push(item)
    else out.set(k, [item])
  }
  return out
}

const inside = (reading: number | 'open', e: Expected) =>
  'open' in e ? reading === 'open' : reading !== 'open' && reading >= e.min && reading <= e.max
const rangeStatus = (v: number, min: number, max: number): RangeStatus => (v < min ? 'too-low' : v > max ? 'too-high' : 'in-range')

/** The visits with everything an inspection record prints about them, in the order given. */
function recordVisits(db: Db, visitIds: readonly number[]) {
  if (visitIds.length === 0) return []
  const ids = [...visitIds]
  const heads = db
    .select({
      id: visits.id,
      siteId: visits.siteId,
      kind: visits.kind,
      status: visits.status,
      scheduledOn: visits.scheduledOn,
      windowFrom: visits.windowFrom,
      windowUntil: visits.windowUntil,
      startedAt: visits.startedAt,
      completedAt: visits.completedAt,
      notes: visits.notes,
      technician: technician.name,
    })
    .from(visits)
    .leftJoin(technician, eq(technician.id, visits.technicianId))
    .where(inArray(visits.id, ids))
    .all()

  const covered = db
    .select({
      visitId: visitDetectors.visitId,
      id: detectors.id,
      tag: detectors.tag,
      serial: detectors.serial,
      position: detectors.position,
      unitTag: units.tag,
      unitKind: units.kind,
      unitLocation: units.location,
      model: detectorModels.name,
      pressureMinInWc: detectors.pressureMinInWc,
      pressureMaxInWc: detectors.pressureMaxInWc,
      velocityMinFpm: detectors.velocityMinFpm,
      velocityMaxFpm: detectors.velocityMaxFpm,
      ...arrangementColumns,
      tasks: visitDetectors.tasks,
      result: visitDetectors.result,
      reason: visitDetectors.resultReason,
      findings: visitDetectors.findings,
      notes: visitDetectors.notes,
      completedAt: visitDetectors.completedAt,
    })
    .from(visitDetectors)
    .innerJoin(detectors, eq(detectors.id, visitDetectors.detectorId))
    .innerJoin(units, eq(units.id, detectors.unitId))
    .innerJoin(detectorModels, eq(detectorModels.id, detectors.modelId))
    .where(inArray(visitDetectors.visitId, ids))
    .all()

  const results = db
    .select({ visitId: taskResults.visitId, detectorId: taskResults.detectorId, task: taskResults.task, outcome: taskResults.outcome, value: taskResults.value, notes: taskResults.notes })
    .from(taskResults)
    .where(inArray(taskResults.visitId, ids))
    .orderBy(asc(taskResults.id))
    .all()

  // Through the detectors' own index: readings carry no index on their visit.
  const detectorIds = [...new Set(covered.map((d) => d.id))]
  const measured = detectorIds.length
    ? db
        .select({ visitId: readings.visitId, detectorId: readings.detectorId, kind: readings.kind, value: readings.value, open: readings.open, takenAt: readings.takenAt })
        .from(readings)
        .where(and(inArray(readings.detectorId, detectorIds), inArray(readings.visitId, ids)))
        .orderBy(asc(readings.takenAt), asc(readings.id))
        .all()
    : []

  const notices = db
    .select({
      visitId: notifications.visitId,
      company: monitoringCompanies.name,
      ...noticeColumns,
      notifiedBy: notifier.name,
      clearedWith: notifications.clearedWith,
      clearedBy: clearer.name,
    })
    .from(notifications)
    .leftJoin(monitoringCompanies, eq(monitoringCompanies.id, notifications.monitoringCompanyId))
    .leftJoin(notifier, eq(notifier.id, notifications.notifiedBy))
    .leftJoin(clearer, eq(clearer.id, notifications.clearedBy))
    .where(inArray(notifications.visitId, ids))
    .orderBy(asc(notifications.notifiedAt), asc(notifications.id))
    .all()

  const key = (visitId: number | null, detectorId: number) => `${visitId}:${detectorId}`
  const resultsOf = groupBy(results, (r) => key(r.visitId, r.detectorId))
  const readingsOf = groupBy(measured, (r) => key(r.visitId, r.detectorId))

  const detectorsOf = groupBy(
    covered.map((d) => {
      const own = readingsOf.get(key(d.visitId, d.id)) ?? []
      // Ordered by time: the last reading of a kind stands for the visit.
      const latest = new Map(own.map((r) => [r.kind, r]))
      const loopReadings: Readings = {}
      for (const [kind, state] of Object.entries(LOOP_KINDS) as Array<[LoopKind, DetectorState]>) {
        const r = latest.get(kind)
        if (r) loopReadings[state] = r.open || r.value === null ? 'open' : r.value
      }
      const arrangement = arrangementOf(d)
      const hasLoop = Object.keys(loopReadings).length > 0
      // Judged against a correctly wired loop of this EOL, conductor and run, as the device page is.
      const expected = expectedCorrect(arrangement)
      const diagnosis = hasLoop ? diagnose(arrangement, loopReadings) : null
      const loop: LoopRow[] = (Object.entries(loopReadings) as Array<[DetectorState, number | 'open']>).map(([state, reading]) => ({
        state,
        reading,
        expected: expected[state],
        inRange: inside(reading, expected[state]),
      }))

      const tests = (resultsOf.get(key(d.visitId, d.id)) ?? []).map((r) => ({ task: r.task, outcome: r.outcome, value: r.value, notes: r.notes }))
      const measures: Measure[] = []
      const pressure = latest.get('pressure')
      if (pressure?.value != null) {
        const check = checkPressure({ measuredInWc: pressure.value, listedMinInWc: d.pressureMinInWc, listedMaxInWc: d.pressureMaxInWc })
        measures.push({ what: 'Tube pressure difference', value: pressure.value, unit: 'in. w.c.', min: d.pressureMinInWc, max: d.pressureMaxInWc, status: check.status })
      }
      const velocity = latest.get('velocity')
      if (velocity?.value != null) {
        measures.push({ what: 'Duct air velocity', value: velocity.value, unit: 'ft/min', min: d.velocityMinFpm, max: d.velocityMaxFpm, status: rangeStatus(velocity.value, d.velocityMinFpm, d.velocityMaxFpm) })
      }
      // No sensitivity window is kept per model: the figure prints with the technician's verdict beside it.
      const sensitivity = latest.get('sensitivity')?.value ?? tests.find((t) => t.task === 'sensitivity' && t.value !== null)?.value ?? null
      if (sensitivity !== null) measures.push({ what: 'Sensitivity', value: sensitivity, unit: '%/ft', min: null, max: null, status: 'no-listing' })
      for (const [kind, what] of [['input-normal', 'Shutdown input, normal'], ['input-alarm', 'Shutdown input, alarm']] as const) {
        const r = latest.get(kind)
        if (r?.value != null) measures.push({ what, value: r.value, unit: 'V AC', min: null, max: null, status: 'no-listing' })
      }

      return {
        visitId: d.visitId,
        id: d.id,
        tag: d.tag,
        serial: d.serial,
        position: d.position,
        unitTag: d.unitTag,
        unitKind: d.unitKind,
        unitLocation: d.unitLocation,
        model: d.model,
        tasks: d.tasks.split(',').filter(Boolean),
        result: d.result,
        reason: d.reason,
        notes: d.notes,
        findings: findingRows(d.findings),
        completedAt: d.completedAt,
        tests,
        loop: diagnosis ? { rows: loop, verdict: diagnosis.verdict, findings: diagnosis.findings.map((f) => f.message), readBy: loopReadBy(d.findings) } : null,
        measures,
      }
    }),
    (d) => d.visitId,
  )
  const noticesOf = groupBy(notices, (n) => n.visitId)
  const order = new Map(ids.map((id, i) => [id, i]))

  return heads
    .sort((a, b) => order.get(a.id)! - order.get(b.id)!)
    .map((v) => ({
      ...v,
      detectors: (detectorsOf.get(v.id) ?? [])
        .sort((a, b) => byTag.compare(a.unitTag, b.unitTag) || byTag.compare(a.tag, b.tag) || a.id - b.id)
        .map(({ visitId: _, ...d }) => d),
      notices: (noticesOf.get(v.id) ?? []).map(({ visitId: _, ...n }) => n),
    }))
}
export type RecordVisit = ReturnType<typeof recordVisits>[number]

/** One visit's inspection record: the site, the contractor and the visit as worked. */
export function visitInspectionRecord(db: Db, visitId: number) {
  const [visit] = recordVisits(db, [visitId])
  if (!visit) return null
  const site = siteHead(db, visit.siteId)
  if (!site) return null
  return { company: companyName(), site, visit }
}

/** A site's record for a period: every visit done with its scheduled day inside [from, to], oldest first. */
export function siteInspectionRecord(db: Db, siteId: number, from: string, to: string) {
  const site = siteHead(db, siteId)
  if (!site) return null
  const inPeriod = and(eq(visits.siteId, siteId), eq(visits.status, 'done'), gte(visits.scheduledOn, from), lte(visits.scheduledOn, to))
  const total = db.select({ n: count() }).from(visits).where(inPeriod).get()!.n
  // The latest visits when capped, printed oldest first.
  const ids = db
    .select({ id: visits.id })
    .from(visits)
    .where(inPeriod)
    .orderBy(desc(visits.scheduledOn), desc(visits.id))
    .limit(PERIOD_VISITS_CAP)
    .all()
    .map((v) => v.id)
    .reverse()
  return { company: companyName(), site, from, to, visits: { rows: recordVisits(db, ids), total } }
}

/** A site's detectors for its label sheet, in roof-plan order. */
export function siteLabelRows(db: Db, siteId: number) {
  const site = siteHead(db, siteId)
  if (!site) return null
  const rows = db
    .select({ id: detectors.id, tag: detectors.tag, serial: detectors.serial, position: detectors.position, unitTag: units.tag })
    .from(detectors)
    .innerJoin(units, eq(units.id, detectors.unitId))
    .where(eq(detectors.siteId, siteId))
    .all()
    .sort((a, b) => byTag.compare(a.unitTag, b.unitTag) || byTag.compare(a.tag, b.tag) || a.id - b.id)
  return { site, detectors: rows }
}
