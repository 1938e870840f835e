// Loads what the one derivation (app/domain/derive.ts) needs from the database, and writes back what it
// returns. Every write that changes a detector's record or history calls `rederive` inside its own
// transaction; the daily refresh and the database check walk the fleet in id ranges through the same
// loader, so memory stays bounded by the chunk size.
import { and, asc, between, eq, gt, gte, inArray, lt, lte, sql, type SQL } from 'drizzle-orm'
import type { AnySQLiteColumn } from 'drizzle-orm/sqlite-core'
import type { Awg } from '~/domain/conductors'
import { addDays, daysBetween } from '~/domain/dates'
import { deriveDetector, STORED_FACT_KEYS, TROUBLE_WINDOW_DAYS, type DetectorRecord, type History, type SitePolicy, type StoredFacts, type TaskResult } from '~/domain/derive'
import type { Arrangement, Readings } from '~/domain/loop'
import type { Db } from './db'
import { appState, detectorModels, detectors, events, readings, sites, taskResults } from './schema'
import { DUE_SOON_DAYS, overdueAfter } from '~/domain/schedule'
import { overduePoints } from '~/domain/triage'
import { TASKS, type Task } from '~/domain/vocabulary'

const LOOP_STATES = { 'loop-normal': 'normal', 'loop-alarm': 'alarm', 'loop-trouble': 'trouble', 'loop-unpowered': 'unpowered' } as const
type LoopKind = keyof typeof LOOP_STATES
const LOOP_KINDS = Object.keys(LOOP_STATES) as LoopKind[]

export interface ArrangementFields {
  eolOhms: number
  eolPlacement: Arrangement['eolPlacement']
  alarmTerminal: Arrangement['alarmTerminal']
  supervisoryTerminal: Arrangement['supervisoryTerminal']
  supervisoryLabelledIn: NonNullable<Arrangement['supervisoryLabelledIn']>
  conductorAwg: number
  conductorStranded: boolean | number
  runFeet: number
  /** The resistor's marked tolerance in percent; null means the usual 5 %. */
  eolTolerancePct?: number | null
  /** The panel input's alarm threshold in ohms; null means the common-practice default in loop.ts. */
  alarmThresholdOhms?: number | null
}

/** The loop as recorded on the detector, read at the panel (where the fire alarm contractor measures). */
export function arrangementOf(d: ArrangementFields): Arrangement {
  return {
    eolOhms: d.eolOhms,
    eolPlacement: d.eolPlacement,
    alarmTerminal: d.alarmTerminal,
    supervisoryTerminal: d.supervisoryTerminal,
    supervisoryLabelledIn: d.supervisoryLabelledIn,
    conductor: { awg: d.conductorAwg as Awg, stranded: Boolean(d.conductorStranded), oneWayFeet: d.runFeet },
    measuredAt: 'panel',
    // Left out when not recorded, so the engine's own defaults (5 %, 100 Ω) apply.
    ...(d.eolTolerancePct != null ? { tolerance: d.eolTolerancePct / 100 } : {}),
    ...(d.alarmThresholdOhms != null ? { maxLineOhms: d.alarmThresholdOhms } : {}),
  }
}

/** The columns `arrangementOf` reads (detectors joined to detector_models), for any query that draws or checks the loop. */
export const arrangementColumns = {
  eolOhms: detectors.eolOhms,
  eolPlacement: detectors.eolPlacement,
  alarmTerminal: detectors.alarmTerminal,
  supervisoryTerminal: detectors.supervisoryTerminal,
  supervisoryLabelledIn: detectorModels.supervisoryLabelledIn,
  conductorAwg: detectors.conductorAwg,
  conductorStranded: detectors.conductorStranded,
  runFeet: detectors.runFeet,
  eolTolerancePct: detectors.eolTolerancePct,
  alarmThresholdOhms: detectors.alarmThresholdOhms,
}

const recordColumns = {
  id: detectors.id,
  installedOn: detectors.installedOn,
  environment: detectors.environment,
  housing: detectors.housing,
  state: detectors.state,
  delaySeconds: detectors.delaySeconds,
  cleaningIntervalDays: detectors.cleaningIntervalDays,
  ...arrangementColumns,
  delayPolicySeconds: sites.delayPolicySeconds,
  keepsNuisanceRecords: sites.keepsNuisanceRecords,
  // What is stored now, to compare with the derivation.
  lastVisualOn: detectors.lastVisualOn,
  lastFunctionalOn: detectors.lastFunctionalOn,
  lastSensitivityOn: detectors.lastSensitivityOn,
  lastCleanedOn: detectors.lastCleanedOn,
  sensitivityStreak: detectors.sensitivityStreak,
  lastResult: detectors.lastResult,
  nextVisualOn: detectors.nextVisualOn,
  nextFunctionalOn: detectors.nextFunctionalOn,
  nextSensitivityOn: detectors.nextSensitivityOn,
  nextCleaningOn: detectors.nextCleaningOn,
  nextDueOn: detectors.nextDueOn,
  dueStatus: detectors.dueStatus,
  loopVerdict: detectors.loopVerdict,
  loopFindings: detectors.loopFindings,
  delayAgreement: detectors.delayAgreement,
  troubles30d: detectors.troubles30d,
  riskScore: detectors.riskScore,
  riskReasons: detectors.riskReasons,
}

export interface DerivationInput {
  id: number
  record: DetectorRecord
  policy: SitePolicy
  history: History
  stored: Record<keyof StoredFacts, unknown>
}

type Selection = { ids: readonly number[] } | { fromId: number; toId: number }

const onDetectors = (sel: Selection, column: AnySQLiteColumn): SQL =>
  'ids' in sel ? inArray(column, [...sel.ids]) : between(column, sel.fromId, sel.toId)

/** Record, policy, history and stored facts for the selected detectors, in id order. */
export function derivationInputs(db: Db, sel: Selection, today: string): DerivationInput[] {
  if ('ids' in sel && sel.ids.length === 0) return []
  const rows = db
    .select(recordColumns)
    .from(detectors)
    .innerJoin(sites, eq(sites.id, detectors.siteId))
    .innerJoin(detectorModels, eq(detectorModels.id, detectors.modelId))
    .where(onDetectors(sel, detectors.id))
    .orderBy(asc(detectors.id))
    .all()
  if (rows.length === 0) return []
  // The history by the ids just read: each is an index seek, not a scan of the table or the window.
  const ids = rows.map((r) => r.id)
  const results = db
    .select({ detectorId: taskResults.detectorId, task: taskResults.task, doneOn: taskResults.doneOn, outcome: taskResults.outcome })
    .from(taskResults)
    .where(inArray(taskResults.detectorId, ids))
    .all()
  const loop = db
    .select({ detectorId: readings.detectorId, kind: readings.kind, value: readings.value, open: readings.open })
    .from(readings)
    .where(and(inArray(readings.detectorId, ids), inArray(readings.kind, LOOP_KINDS)))
    .orderBy(asc(readings.detectorId), asc(readings.takenAt), asc(readings.id))
    .all()
  // Only troubles inside the window matter; an instant's day is its first ten characters.
  const troubles = db
    .select({ detectorId: events.detectorId, occurredAt: events.occurredAt })
    .from(events)
    .where(
      and(
        inArray(events.detectorId, ids),
        // Unary plus: keeps SQLite on events_detector_idx (a seek per id) instead of every recent trouble.
        sql`+${events.kind} = 'trouble'`,
        gte(events.occurredAt, addDays(today, -(TROUBLE_WINDOW_DAYS - 1))),
      ),
    )
    .all()

  const byId = new Map<number, DerivationInput>()
  for (const d of rows) {
    const { id, delayPolicySeconds, keepsNuisanceRecords, ...rest } = d
    byId.set(id, {
      id,
      record: {
        installedOn: rest.installedOn,
        environment: rest.environment,
        housing: rest.housing,
        state: rest.state,
        delaySeconds: rest.delaySeconds,
        cleaningIntervalDays: rest.cleaningIntervalDays,
        arrangement: arrangementOf(rest),
      },
      policy: { delayPolicySeconds, nuisanceRecordsKept: Boolean(keepsNuisanceRecords) },
      history: { results: [], loopReadings: {}, troubles: [] },
      stored: rest,
    })
  }
  for (const r of results) (byId.get(r.detectorId)?.history.results as TaskResult[] | undefined)?.push(r)
  // Ordered by time, so the last one written per state is the latest.
  for (const r of loop) {
    const input = byId.get(r.detectorId)
    if (input) (input.history.loopReadings as Readings)[LOOP_STATES[r.kind as LoopKind]] = r.open ? 'open' : (r.value ?? 'open')
  }
  for (const t of troubles) if (t.detectorId !== null) (byId.get(t.detectorId)?.history.troubles as string[] | undefined)?.push(t.occurredAt)
  return [...byId.values()]
}

export function deriveInput(input: DerivationInput, today: string) {
  return deriveDetector(input.record, input.policy, input.history, today)
}

// One prepared UPDATE per connection, its values bound per row: building the SQL for every detector
// cost more than running it.
const updates = new WeakMap<Db, { run: (values: Record<string, unknown>) => unknown }>()
function writeFacts(db: Db, id: number, facts: StoredFacts) {
  let statement = updates.get(db)
  if (!statement) {
    const set = Object.fromEntries(STORED_FACT_KEYS.map((k) => [k, sql.placeholder(k)])) as unknown as Partial<StoredFacts>
    statement = db.update(detectors).set(set).where(eq(detectors.id, sql.placeholder('id'))).prepare()
    updates.set(db, statement)
  }
  statement.run({ ...facts, id })
}

const changed = (stored: DerivationInput['stored'], facts: StoredFacts) =>
  (Object.keys(facts) as Array<keyof StoredFacts>).some((k) => (stored[k] ?? null) !== (facts[k] ?? null))

/**
 * Re-derives the given detectors and writes the facts that changed. Call it inside the transaction
 * that wrote their record or history, so the record never disagrees with its history.
 */
export function rederive(db: Db, ids: readonly number[], today: string): number {
  let n = 0
  for (const input of derivationInputs(db, { ids }, today)) {
    const facts = deriveInput(input, today).stored
    if (changed(input.stored, facts)) {
      writeFacts(db, input.id, facts)
      n++
    }
  }
  return n
}

/** The fleet's id range, walked in chunks by the refresh and the check. */
export function detectorIdRange(db: Db): { min: number; max: number } | null {
  const r = db.select({ min: sql<number | null>`min(${detectors.id})`, max: sql<number | null>`max(${detectors.id})` }).from(detectors).get()
  return r && r.min !== null && r.max !== null ? { min: r.min, max: r.max } : null
}

export const CHUNK = 2_000

/** Each chunk of the fleet's derivation inputs, in id order. */
export function* fleetInputs(db: Db, today: string, chunk = CHUNK): Generator<DerivationInput[]> {
  const range = detectorIdRange(db)
  if (!range) return
  for (let from = range.min; from <= range.max; from += chunk) yield derivationInputs(db, { fromId: from, toId: from + chunk - 1 }, today)
}

/** Re-derives one chunk of inputs in its own short IMMEDIATE transaction; returns how many changed. */
function rederiveChunk(db: Db, inputs: DerivationInput[], today: string): number {
  const updates = inputs.map((i) => [i, deriveInput(i, today).stored] as const).filter(([i, f]) => changed(i.stored, f))
  if (updates.length === 0) return 0
  db.$client
    .transaction(() => {
      for (const [i, f] of updates) writeFacts(db, i.id, f)
    })
    .immediate()
  return updates.length
}

/** Re-derives the whole fleet for `today`, one short transaction per chunk; writes only what changed. */
export function rederiveFleet(db: Db, today: string): { checked: number; changed: number } {
  let checked = 0
  let n = 0
  for (const inputs of fleetInputs(db, today)) {
    n += rederiveChunk(db, inputs, today)
    checked += inputs.length
  }
  return { checked, changed: n }
}

/**
 * The detectors whose stored facts can change when the office day moves from `from` to `to`, found on
 * indexes rather than by reading the fleet: the earliest due date reaching the due-soon window or its
 * own day; among detectors already due or overdue, a task leaving its window or reaching its next
 * step of lateness (its risk points grow); and a trouble leaving the 30-day window. Any other fact
 * changes only with a write, which re-derives then.
 */
export function dayTurnCandidates(db: Db, from: string, to: string): number[] {
  const ids = new Set<number>()
  for (const query of dayTurnQueries(db, from, to)) for (const id of query()) ids.add(id)
  return [...ids].sort((x, y) => x - y)
}

/** The candidate search as separate index queries, so the refresh can yield between them. */
export function dayTurnQueries(db: Db, from: string, to: string): Array<() => number[]> {
  const nextDue = detectors.nextDueOn
  const ranges: SQL[] = [
    // Falling due (or, with no window, overdue the day after): due on a day in [from, to].
    and(gte(nextDue, from), lte(nextDue, to))!,
    // Turning due soon: the planning window's far edge passed the due day.
    and(gt(nextDue, addDays(from, DUE_SOON_DAYS)), lte(nextDue, addDays(to, DUE_SOON_DAYS)))!,
  ]
  // Each range on its own: SQLite's OR-of-ranges plan cost 100 ms at stress scale, the parts a few ms.
  const inRange = ranges.map((range) => () => db.select({ id: detectors.id }).from(detectors).where(range).all().map((r) => r.id))
  const ageing = () =>
    db
    .selectDistinct({ id: events.detectorId })
    .from(events)
    .where(
      and(
        eq(events.kind, 'trouble'),
        gte(events.occurredAt, addDays(from, -(TROUBLE_WINDOW_DAYS - 1))),
        lt(events.occurredAt, addDays(to, -(TROUBLE_WINDOW_DAYS - 1))),
      ),
    )
    .all()
    .flatMap((r) => (r.id === null ? [] : [r.id]))
  // The lateness check runs JavaScript date arithmetic per row: in id slices, so no one query holds
  // the event loop for long (a stress-scale fleet has tens of thousands overdue).
  const late: Array<() => number[]> = []
  const range = detectorIdRange(db)
  if (range) {
    for (let at = range.min; at <= range.max; at += LATE_SLICE) {
      const ids = { fromId: at, toId: at + LATE_SLICE - 1 }
      late.push(() => lateStepMoves(db, 'due', ids, from, to), () => lateStepMoves(db, 'overdue', ids, from, to))
    }
  }
  return [...inRange, ...late, ageing]
}

/**
 * Among detectors already due or overdue (one status at a time, a seek on the due index), those where
 * some task's overdue points differ between `from` and `to`: it left its window, or its lateness
 * reached its next step. Judged with the engine's own window and points, so it misses none.
 */
const LATE_SLICE = 5_000

function lateStepMoves(db: Db, status: 'due' | 'overdue', ids: { fromId: number; toId: number }, from: string, to: string): number[] {
  const rows = db
    .select({ id: detectors.id, visual: detectors.nextVisualOn, functional: detectors.nextFunctionalOn, sensitivity: detectors.nextSensitivityOn, cleaning: detectors.nextCleaningOn })
    .from(detectors)
    .where(and(eq(detectors.dueStatus, status), between(detectors.id, ids.fromId, ids.toId)))
    .all()
  const moves = (task: Task, dueOn: string | null) => {
    // Not yet due on `to`: no points either day (a text comparison spares the date arithmetic).
    if (dueOn === null || dueOn >= to) return false
    const end = overdueAfter(task, dueOn)
    return overduePoints(task, daysBetween(end, from)) !== overduePoints(task, daysBetween(end, to))
  }
  return rows.filter((r) => TASKS.some((t) => moves(t, r[t]))).map((r) => r.id)
}

export interface TurnStats {
  checked: number
  changed: number
  turns: number
  /** The longest the event loop was held by one chunk (load, derive, write), in wall time. */
  slowestTurnMs: number
  /** The same in CPU time, which a busy machine does not inflate. */
  slowestTurnCpuMs: number
}

// Each turn aims to hold the event loop this long; the chunk size follows what the last turn cost, so
// the first turns (cold caches, code not yet compiled) stay small and a busy machine gets smaller bites.
const TURN_TARGET_MS = 10
const FIRST_TURN = 2
const MAX_TURN = 500

export const nextTurn = () => new Promise((resolve) => setImmediate(resolve))

/**
 * Gives the event loop back for as long as the last turn held it (at least a few ms). A request needs
 * several trips through the loop (accept, read, route, write); with only `setImmediate` between turns
 * each trip waited a whole turn, so /healthz took 70 ms at the median during a day turn at stress scale.
 * Resting as long as the work ran lets a waiting request finish in one gap, at half the refresh's pace.
 */
export const restAfter = (heldMs: number) => new Promise((resolve) => setTimeout(resolve, Math.min(50, Math.max(4, heldMs))))

/**
 * Runs turn after turn, handing the event loop back between them so requests are answered meanwhile.
 * `take(n)` loads the next n detectors' inputs, or null when there are no more.
 */
async function inTurns(db: Db, today: string, take: (n: number) => DerivationInput[] | null): Promise<TurnStats> {
  const stats: TurnStats = { checked: 0, changed: 0, turns: 0, slowestTurnMs: 0, slowestTurnCpuMs: 0 }
  let size = FIRST_TURN
  for (;;) {
    const started = performance.now()
    const cpu = process.cpuUsage()
    const inputs = take(size)
    if (inputs === null) break
    stats.changed += rederiveChunk(db, inputs, today)
    stats.checked += inputs.length
    stats.turns++
    const used = process.cpuUsage(cpu)
    const ms = performance.now() - started
    stats.slowestTurnMs = Math.max(stats.slowestTurnMs, ms)
    stats.slowestTurnCpuMs = Math.max(stats.slowestTurnCpuMs, (used.user + used.system) / 1000)
    size = Math.max(1, Math.min(MAX_TURN, Math.round((size * TURN_TARGET_MS) / Math.max(ms, 1))))
    await restAfter(ms)
  }
  stats.slowestTurnMs = Math.round(stats.slowestTurnMs)
  stats.slowestTurnCpuMs = Math.round(stats.slowestTurnCpuMs)
  return stats
}

/** The whole fleet in turns, walking the id range. */
export function rederiveFleetInTurns(db: Db, today: string): Promise<TurnStats> {
  const range = detectorIdRange(db)
  let cursor = range?.min ?? 1
  return inTurns(db, today, (n) => {
    if (!range || cursor > range.max) return null
    const inputs = derivationInputs(db, { fromId: cursor, toId: cursor + n - 1 }, today)
    cursor += n
    return inputs
  })
}

/** The given detectors in turns. */
export function rederiveInTurns(db: Db, ids: readonly number[], today: string): Promise<TurnStats> {
  let at = 0
  return inTurns(db, today, (n) => {
    if (at >= ids.length) return null
    const slice = ids.slice(at, at + n)
    at += n
    return derivationInputs(db, { ids: slice }, today)
  })
}

const DERIVED_DAY = 'derived-day'

/** The office day the stored facts were last derived for (null before the first derivation). */
export function derivedDay(db: Db): string | null {
  return db.select({ value: appState.value }).from(appState).where(eq(appState.key, DERIVED_DAY)).get()?.value ?? null
}

export function setDerivedDay(db: Db, day: string) {
  const at = new Date().toISOString()
  db.insert(appState)
    .values({ key: DERIVED_DAY, value: day, updatedAt: at })
    .onConflictDoUpdate({ target: appState.key, set: { value: day, updatedAt: at } })
    .run()
}

/** Longest gap worth walking by candidates; past it every overdue step has been crossed anyway. */
export const MAX_CANDIDATE_GAP_DAYS = 60

/** How far `from` → `to` should be re-derived: nothing, the day-turn candidates, or the whole fleet. */
export function turnPlan(from: string | null, to: string): 'none' | 'candidates' | 'fleet' {
  if (from === to) return 'none'
  if (from === null || from > to || daysBetween(from, to) > MAX_CANDIDATE_GAP_DAYS) return 'fleet'
  return 'candidates'
}
