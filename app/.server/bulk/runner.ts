import { randomUUID } from 'node:crypto'
import { writeAudit } from '../audit'
import { writeTx, type Db } from '../db'
import { rederive } from '../derivation'
import { listsChanged } from '../list-query'
import { BulkError, type BulkAction, type BulkChange, type BulkContext, type BulkEntity, type BulkPlan, type BulkRefusal, type Fields } from './action'
import { insertVisit } from './creates'
import { writeHistory } from './history'
import type { Through } from './selection'
import { writeFields } from './write'

/** Rows of a preview or result sent back; the whole selection is still applied. */
export const LISTED_ROWS = 200
// Up to this many records, a preview hands the versions to the caller, who sends them back to apply.
// Beyond it they stay on the server under the preview's id (a body holds at most 1 MB).
const VERSIONS_INLINE = 2_000

export interface PreviewAnswer {
  action: string
  entity: BulkEntity
  /** Records selected. */
  selected: number
  /** For a selection made on the sites, customers or events list: how many of those rows, standing for how many detectors. */
  through?: Through
  summary: string
  changeCount: number
  refusedCount: number
  /** The first LISTED_ROWS of each. */
  changes: BulkChange[]
  refused: BulkRefusal[]
  extra?: unknown
  /** Send back to apply exactly what was previewed (valid 30 minutes, for the same person). */
  previewId: string
  /** id → version previewed, for a selection small enough to send back whole. */
  versions?: Record<string, number>
}

export interface ApplyAnswer {
  /** The bulk_changes row to undo with; null when nothing was applied. */
  changeId: number | null
  applied: number
  refusedCount: number
  refused: BulkRefusal[]
  summary: string
}

/** One record as a bulk change left it, kept in bulk_changes.records for display and undo. */
export interface ChangedRecord {
  entity: BulkEntity
  id: number
  label: string
  before: Fields
  after: Fields
  /** The version the change left; undo refuses the record if it has moved on. */
  version: number
  /** A visit the change booked: undo removes it instead of putting fields back. */
  created?: true
  /** The history line (event) the change wrote on the detector: undo removes it. */
  eventId?: number
  /** Set nothing the derivation reads (`BulkChange.keepsFacts`): neither apply nor undo re-derives it. */
  keepsFacts?: true
}

interface Snapshot {
  actorId: number
  action: string
  input: string
  ids: readonly number[]
  versions: Map<number, number>
  at: number
}
const PREVIEW_TTL_MS = 30 * 60_000
const MAX_SNAPSHOTS = 200
const snapshots = new Map<string, Snapshot>()

function remember(s: Snapshot): string {
  const now = Date.now()
  for (const [k, v] of snapshots) if (now - v.at > PREVIEW_TTL_MS) snapshots.delete(k)
  if (snapshots.size >= MAX_SNAPSHOTS) snapshots.delete(snapshots.keys().next().value as string)
  const id = randomUUID()
  snapshots.set(id, s)
  return id
}

// The last few plans of actions with a `basis`, for the apply that follows their preview. Judging
// 10,000 visits again inside the apply's transaction took four times as long as writing them, while
// the basis (versions of the selection, each technician's booked visits per day, the calendar)
// reads in about 15 ms and, unchanged, means the same judgement. Few, as a plan holds every record;
// one not kept (or kept on another thread) is simply worked out again.
interface KeptPlan {
  action: string
  actorId: number
  input: string
  ids: readonly number[]
  basis: string
  plan: BulkPlan
  at: number
  /** The connection the preview read through, its `fileMark` before the preview, and the office day. */
  db: Db
  mark: string
  today: string
}

/**
 * Whether anything has been written to the file since: SQLite's data_version moves when another
 * connection commits, total_changes() when this one writes. Equal marks on one connection mean not
 * a row changed between the two reads, so a plan made after the first stands at the second without
 * reading its basis again.
 */
function fileMark(db: Db): string {
  const version = db.$client.pragma('data_version', { simple: true }) as number
  const own = (db.$client.prepare('select total_changes() as n').get() as { n: number }).n
  return `${version}:${own}`
}
const KEPT_PLANS = 4
const kept: KeptPlan[] = []

const sameIds = (a: readonly number[], b: readonly number[]) => a === b || (a.length === b.length && a.every((id, i) => id === b[i]))

/** The kept plan of a preview of this very request, taken out of the store; undefined when there is none. */
function takeKept(action: BulkAction<unknown>, ids: readonly number[], input: unknown, actorId: number): KeptPlan | undefined {
  const text = JSON.stringify(input)
  const at = kept.findIndex((k) => k.action === action.name && k.actorId === actorId && k.input === text && sameIds(k.ids, ids))
  if (at < 0) return undefined
  const [k] = kept.splice(at, 1)
  return Date.now() - k.at > PREVIEW_TTL_MS ? undefined : k
}

/** Runs the action's preview and keeps the versions it read, for the apply that follows. */
export function previewBulk<I>(db: Db, action: BulkAction<I>, ids: readonly number[], input: I, ctx: BulkContext, through?: Through): PreviewAnswer {
  // The basis is read before the plan: a write landing between the two makes the apply judge
  // afresh, where read after it could let a plan made on older data pass as current.
  const mark = fileMark(db)
  const basis = action.basis?.(db, ids, input, ctx)
  const plan = action.preview(db, ids, input, ctx)
  if (basis !== undefined) {
    takeKept(action as BulkAction<unknown>, ids, input, ctx.actor.id)
    if (kept.length >= KEPT_PLANS) kept.shift()
    kept.push({ action: action.name, actorId: ctx.actor.id, input: JSON.stringify(input), ids, basis, plan, at: Date.now(), db, mark, today: ctx.today })
  }
  const versions = new Map(plan.changes.map((c) => [c.id, c.version]))
  const previewId = remember({ actorId: ctx.actor.id, action: action.name, input: JSON.stringify(input), ids, versions, at: Date.now() })
  return {
    action: action.name,
    entity: action.entity,
    selected: ids.length,
    ...(through ? { through } : {}),
    summary: plan.summary,
    changeCount: plan.changes.length,
    refusedCount: plan.refused.length,
    changes: plan.changes.slice(0, LISTED_ROWS),
    refused: plan.refused.slice(0, LISTED_ROWS),
    extra: plan.extra,
    previewId,
    versions: versions.size <= VERSIONS_INLINE ? Object.fromEntries(versions) : undefined,
  }
}

/** The selection and versions a preview kept, checked against who asks and what for. */
export function previewed(previewId: string, action: BulkAction<unknown>, input: unknown, actorId: number): { ids: readonly number[]; versions: Map<number, number> } {
  const s = snapshots.get(previewId)
  if (!s || Date.now() - s.at > PREVIEW_TTL_MS || s.actorId !== actorId || s.action !== action.name) {
    throw new BulkError(409, 'That preview has expired or is not yours; preview again.')
  }
  if (s.input !== JSON.stringify(input)) throw new BulkError(409, 'The settings differ from the ones previewed; preview again.')
  return { ids: s.ids, versions: s.versions }
}

/**
 * Applies an action to the selection previewed, in one IMMEDIATE transaction: the preview is run
 * again over the same selection on the data as it now is (so capacity and the like are judged as
 * the preview judged them) — or, when the action's `basis` read now equals the one read with the
 * last preview of this same request, that preview's plan is taken as it is. Each change to a record
 * whose version is not the previewed one (`previewed`: id → version) is refused and left alone, the
 * rest are written. A throw anywhere rolls all of it back. Detectors changed are re-derived in the
 * same transaction.
 */
export function applyBulk<I>(db: Db, action: BulkAction<I>, input: I, ids: readonly number[], previewed: ReadonlyMap<number, number>, ctx: BulkContext): ApplyAnswer {
  const last = action.basis ? takeKept(action as BulkAction<unknown>, ids, input, ctx.actor.id) : undefined
  const answer = writeTx(db, () => {
    const stands = last && last.db === db && last.today === ctx.today && (fileMark(db) === last.mark || action.basis!(db, ids, input, ctx) === last.basis)
    const { plan, held } = stands ? { plan: last.plan, held: [] } : judgeAgain(db, action, ids, input, ctx, previewed)
    const refused = [...plan.refused, ...held]
    const done: ChangedRecord[] = []
    const stale = (c: BulkChange, seen: number, now: number | string) =>
      refused.push({ id: c.id, label: c.label, reason: `Changed since the preview (version ${seen} then, ${now} now); left as it is` })
    for (const c of plan.changes) {
      const seen = previewed.get(c.id)
      if (seen === undefined) refused.push({ id: c.id, label: c.label, reason: 'Not in the preview; left as it is' })
      else if (c.version !== seen) stale(c, seen, c.version)
      else if (c.create) done.push(insertVisit(db, { ...c, create: c.create }, ctx.actor.id))
      else if (!writeFields(db, c.entity, c.id, c.to, seen)) stale(c, seen, 'another')
      else {
        const eventId = c.history && c.entity === 'detector' ? writeHistory(db, c.id, c.history, ctx.actor.id, ctx.now) : undefined
        done.push({ entity: c.entity, id: c.id, label: c.label, before: c.from, after: c.to, version: seen + 1, ...(eventId ? { eventId } : {}), ...(c.keepsFacts ? { keepsFacts: true as const } : {}) })
      }
    }
    if (done.length === 0) return { changeId: null, applied: 0, refused, summary: plan.summary }
    rederiveDetectors(db, done, ctx.today)
    const changeId = recordChange(db, action.name, plan.summary, done, ctx.actor.id)
    return { changeId, applied: done.length, refused, summary: plan.summary }
  })
  listsChanged()
  return { ...answer, refusedCount: answer.refused.length, refused: answer.refused.slice(0, LISTED_ROWS) }
}

/**
 * The action's plan worked out again on the data as it now stands, for the records it may still
 * change. A record changed since the preview, or one the preview did not offer to change, is left
 * as it is; and as it stays where it is, the plan is worked out again without it (a visit left on
 * its day still fills that day for the others), until every change is one the preview offered.
 */
function judgeAgain<I>(db: Db, action: BulkAction<I>, ids: readonly number[], input: I, ctx: BulkContext, previewed: ReadonlyMap<number, number>) {
  const held: BulkRefusal[] = []
  let selection = ids
  for (;;) {
    const plan = action.preview(db, selection, input, ctx)
    const left = plan.changes.filter((c) => previewed.get(c.id) !== c.version)
    const leftIds = new Set(left.map((c) => c.id))
    const inSelection = new Set(selection)
    const rest = selection.filter((id) => !leftIds.has(id))
    // A change to a record outside the selection (a visit to be booked) cannot be held back by
    // narrowing it: the apply refuses that change itself.
    if (rest.length === selection.length) return { plan, held }
    selection = rest
    for (const c of left) {
      if (!inSelection.has(c.id)) continue
      const seen = previewed.get(c.id)
      held.push({
        id: c.id,
        label: c.label,
        reason: seen === undefined ? 'Not in the preview; left as it is' : `Changed since the preview (version ${seen} then, ${c.version} now); left as it is`,
      })
    }
  }
}

/**
 * Re-derives the detectors among `records` whose change the derivation can see, in chunks SQLite's
 * parameter limit allows; a change that keeps the facts costs no re-derivation.
 */
export function rederiveDetectors(db: Db, records: readonly ChangedRecord[], today: string) {
  const ids = records.filter((r) => r.entity === 'detector' && !r.keepsFacts).map((r) => r.id)
  for (let i = 0; i < ids.length; i += 2_000) rederive(db, ids.slice(i, i + 2_000), today)
}

function recordChange(db: Db, action: string, summary: string, records: ChangedRecord[], actorId: number): number {
  // Raw SQL: the ORM spent longer turning thousands of records into its statement than SQLite took to store them.
  const row = db.$client
    .prepare('insert into bulk_changes (actor_id, action, summary, record_count, records) values (?, ?, ?, ?, ?) returning id')
    .get(actorId, action, summary, records.length, JSON.stringify(records)) as { id: number }
  writeAudit(db, {
    actorId,
    action: `bulk.${action}`,
    entity: records[0].entity,
    entityId: row.id,
    after: { changeId: row.id, summary, count: records.length, records: records.map((r) => r.id) },
  })
  return row.id
}
