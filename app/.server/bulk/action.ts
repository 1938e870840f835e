import type { z } from 'zod'
import type { Capability, Role } from '~/domain/permissions'
import type { Db } from '../db'
import type { CompanyCalendar } from './calendar'
import type { VisitCreate } from './creates'

/**
 * A bulk action is declared once, as a `BulkAction`, and listed in `registry.ts`; the runner does
 * the rest. `preview` is pure reading: it says, record by record, which fields it would change from
 * what to what, and which records it refuses and why. Applying runs the same `preview` again inside
 * one IMMEDIATE transaction (or, for an action with a `basis` that has not changed since the
 * preview, takes the plan that preview made), refuses any record whose version is not the one the
 * caller previewed, writes the `to` fields (bumping each version), re-derives changed detectors, and writes one audit
 * entry and one `bulk_changes` row, from which the change can be undone. So what is applied is
 * exactly what a preview on the same data shows; an action never writes by itself.
 *
 * Field names are the Drizzle schema's property names of the entity's table (`scheduledOn`,
 * `assignedTo`…); the writer maps them to columns and refuses any other name.
 */
export interface BulkAction<I = unknown> {
  /** The URL segment: POST /api/bulk/<name>. */
  name: string
  /** What the action does, for the UI's buttons and the palette. */
  title: string
  entity: BulkEntity
  /**
   * The lists a selection for it may be made on, besides the entity's own: a detector action can be
   * offered on sites, customers or events, and then acts on the detectors those rows stand for.
   */
  through?: readonly ThroughList[]
  /** Who may run it; the route answers 403 to any other role. */
  capability: Capability
  /** The action's own fields of the request body (the selection and `preview` are taken off first). */
  input: z.ZodType<I>
  preview(db: Db, ids: readonly number[], input: I, ctx: BulkContext): BulkPlan
  /**
   * Optional: everything `preview` reads, condensed into a string that is equal only when the same
   * preview would give the same plan (versions, loads, the calendar, the day). Read again inside the
   * apply's transaction: when it still equals the preview's, the runner applies the plan it kept
   * from that preview instead of working it out again. Undefined: always worked out again.
   */
  basis?(db: Db, ids: readonly number[], input: I, ctx: BulkContext): string | undefined
}

export type BulkEntity = 'visit' | 'detector'

/** Lists whose rows stand for detectors (see selection.ts). */
export type ThroughList = 'sites' | 'customers' | 'events'

export type Fields = Record<string, string | number | boolean | null>

export interface BulkChange {
  entity: BulkEntity
  id: number
  /** How a person recognises the record: a tag and site, a visit's number, site and date. */
  label: string
  from: Fields
  to: Fields
  /** The record's version as read; apply refuses the record if it is not still this. */
  version: number
  /** A visit to book instead of a record to change (see creates.ts): `id` and `version` then name and fingerprint it. */
  create?: VisitCreate
  /** A line for the detector's history (an event of kind 'change' by the actor), written with the change and removed by its undo. */
  history?: string
  /**
   * The fields it sets are none the derivation reads, so the detector's stored facts cannot change:
   * the runner (and its undo) leave it out of the re-derivation.
   */
  keepsFacts?: true
}

export interface BulkRefusal {
  id: number
  label: string
  reason: string
}

export interface BulkPlan {
  changes: BulkChange[]
  refused: BulkRefusal[]
  /** One line for people: "Move 48 visits by 2 working days". */
  summary: string
  /** Anything else to show beside the rows, e.g. each technician's day load before and after. */
  extra?: unknown
}

export interface BulkContext {
  actor: { id: number; role: Role }
  /** The office's day: nothing moves before it, derivation runs for it. */
  today: string
  /** Working days: weekends, the observed public holidays of each region, the company's closed days. */
  calendar: CompanyCalendar
  /** Now, as an ISO instant, for fields that record when (acknowledged at, cancelled at). */
  now: string
}

/** A request the caller can fix, or may not make: the route answers with the status and message. */
export class BulkError extends Error {
  constructor(
    readonly status: 400 | 403 | 404 | 409,
    message: string,
  ) {
    super(message)
  }
}

/** Declares an action with its input type inferred from its schema. */
export function defineAction<S extends z.ZodType>(a: Omit<BulkAction<z.infer<S>>, 'input'> & { input: S }): BulkAction<unknown> {
  // Widened for the registry: the route hands `preview` only what `input` parsed.
  return a as unknown as BulkAction<unknown>
}
