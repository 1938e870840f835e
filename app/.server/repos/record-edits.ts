// Office edits of customers, sites, units, detectors and detector models' listed ranges. One path for
// the edit pages and the JSON API: in one IMMEDIATE transaction the version read by the editor is
// checked, the changed fields written, the version bumped, the detectors whose derived facts can move
// re-derived, and the change audited with the before and after of the changed fields only.
import { and, asc, count, desc, eq, sql, type SQL } from 'drizzle-orm'
import type { SQLiteColumn } from 'drizzle-orm/sqlite-core'
import { z } from 'zod'
import {
  customerForm,
  detectorCautions,
  detectorForm,
  fieldErrorsOf,
  modelForm,
  siteCautions,
  siteForm,
  unitCautions,
  unitForm,
  versionOf,
  type Caution,
} from '~/domain/record-forms'
import { writeAudit } from '../audit'
import { getDb, writeTx, type Db } from '../db'
import { readJsonOrForm } from '../http'
import { officeToday } from '../today'
import { rederive } from '../derivation'
import { listsChanged } from '../list-query'
import { auditLog, customers, detectorModels, detectors, monitoringCompanies, sites, units, users } from '../schema'
import { unitColumns } from './unit'

export type EditKind = 'customer' | 'site' | 'unit' | 'detector' | 'model'

type Fields = Record<string, unknown>
type Editable = Fields & { version: number }

interface Spec {
  schema: z.ZodType<Fields, unknown>
  cautions: (values: Fields) => Caution[]
  read: (db: Db, id: number) => Editable | undefined
  /** Writes the changed fields and the next version; false when the row was not at `version`. */
  write: (db: Db, id: number, changed: Fields, version: number) => boolean
  /** Detectors whose stored facts may follow from the change. */
  affected: (db: Db, id: number, changed: Fields) => number[]
}

const customerColumns = {
  name: customers.name,
  kind: customers.kind,
  contactName: customers.contactName,
  contactEmail: customers.contactEmail,
  contactPhone: customers.contactPhone,
}

const siteColumns = {
  name: sites.name,
  street: sites.street,
  city: sites.city,
  region: sites.region,
  postalCode: sites.postalCode,
  timeZone: sites.timeZone,
  jurisdiction: sites.jurisdiction,
  ahjName: sites.ahjName,
  ahjContact: sites.ahjContact,
  codeBasis: sites.codeBasis,
  monitoringCompanyId: sites.monitoringCompanyId,
  monitoringAccount: sites.monitoringAccount,
  delayPolicySeconds: sites.delayPolicySeconds,
  keepsNuisanceRecords: sites.keepsNuisanceRecords,
  accessNotes: sites.accessNotes,
}

const detectorColumns = {
  tag: detectors.tag,
  serial: detectors.serial,
  modelId: detectors.modelId,
  position: detectors.position,
  headsFitted: detectors.headsFitted,
  housing: detectors.housing,
  environment: detectors.environment,
  delaySeconds: detectors.delaySeconds,
  delayObservedOn: detectors.delayObservedOn,
  eolOhms: detectors.eolOhms,
  eolTolerancePct: detectors.eolTolerancePct,
  alarmThresholdOhms: detectors.alarmThresholdOhms,
  eolPlacement: detectors.eolPlacement,
  alarmTerminal: detectors.alarmTerminal,
  supervisoryTerminal: detectors.supervisoryTerminal,
  conductorAwg: detectors.conductorAwg,
  conductorStranded: detectors.conductorStranded,
  runFeet: detectors.runFeet,
  testStation: detectors.testStation,
  testStationFeet: detectors.testStationFeet,
  velocityMinFpm: detectors.velocityMinFpm,
  velocityMaxFpm: detectors.velocityMaxFpm,
  pressureMinInWc: detectors.pressureMinInWc,
  pressureMaxInWc: detectors.pressureMaxInWc,
  cleaningIntervalDays: detectors.cleaningIntervalDays,
}

const modelColumns = {
  velocityMinFpm: detectorModels.velocityMinFpm,
  velocityMaxFpm: detectorModels.velocityMaxFpm,
  pressureMinInWc: detectorModels.pressureMinInWc,
  pressureMaxInWc: detectorModels.pressureMaxInWc,
  sensitivityLowPctFt: detectorModels.sensitivityLowPctFt,
  sensitivityHighPctFt: detectorModels.sensitivityHighPctFt,
}

const bump = (column: SQLiteColumn) => sql<number>`${column} + 1`

const detectorIdsWhere = (db: Db, where: SQL) =>
  db.select({ id: detectors.id }).from(detectors).where(where).all().map((r) => r.id)

const SPECS: Record<EditKind, Spec> = {
  customer: {
    schema: customerForm,
    cautions: () => [],
    read: (db, id) => db.select({ ...customerColumns, version: customers.version }).from(customers).where(eq(customers.id, id)).get(),
    write: (db, id, changed, version) =>
      db
        .update(customers)
        .set({ ...changed, version: bump(customers.version) })
        .where(and(eq(customers.id, id), eq(customers.version, version)))
        .run().changes === 1,
    // Nothing the derivation reads lives on the customer.
    affected: () => [],
  },
  site: {
    schema: siteForm,
    cautions: siteCautions,
    read: (db, id) => db.select({ ...siteColumns, version: sites.version }).from(sites).where(eq(sites.id, id)).get(),
    write: (db, id, changed, version) =>
      db
        .update(sites)
        .set({ ...changed, version: bump(sites.version) })
        .where(and(eq(sites.id, id), eq(sites.version, version)))
        .run().changes === 1,
    // The delay policy decides every detector's delay agreement (and so its risk) at the site; the
    // nuisance-alarm record decides whether its sensitivity tests may stretch to 5 years.
    affected: (db, id, changed) =>
      'delayPolicySeconds' in changed || 'keepsNuisanceRecords' in changed ? detectorIdsWhere(db, eq(detectors.siteId, id)) : [],
  },
  unit: {
    schema: unitForm,
    cautions: unitCautions,
    read: (db, id) => db.select({ ...unitColumns, version: units.version }).from(units).where(eq(units.id, id)).get(),
    write: (db, id, changed, version) =>
      db
        .update(units)
        .set({ ...changed, version: bump(units.version) })
        .where(and(eq(units.id, id), eq(units.version, version)))
        .run().changes === 1,
    // Re-derived so the unit's detectors never lag a change to it, should the derivation come to read one.
    affected: (db, id) => detectorIdsWhere(db, eq(detectors.unitId, id)),
  },
  detector: {
    schema: detectorForm,
    cautions: detectorCautions,
    read: (db, id) => db.select({ ...detectorColumns, version: detectors.version }).from(detectors).where(eq(detectors.id, id)).get(),
    write: (db, id, changed, version) => {
      // The site and customer copied onto the detector are set again from its unit, so they cannot drift.
      const owner = db
        .select({ siteId: units.siteId, customerId: sites.customerId })
        .from(detectors)
        .innerJoin(units, eq(units.id, detectors.unitId))
        .innerJoin(sites, eq(sites.id, units.siteId))
        .where(eq(detectors.id, id))
        .get()
      return (
        db
          .update(detectors)
          .set({ ...changed, ...owner, version: bump(detectors.version), updatedAt: new Date().toISOString() })
          .where(and(eq(detectors.id, id), eq(detectors.version, version)))
          .run().changes === 1
      )
    },
    affected: (_db, id) => [id],
  },
  model: {
    schema: modelForm,
    cautions: () => [],
    read: (db, id) => db.select({ ...modelColumns, version: detectorModels.version }).from(detectorModels).where(eq(detectorModels.id, id)).get(),
    write: (db, id, changed, version) =>
      db
        .update(detectorModels)
        .set({ ...changed, version: bump(detectorModels.version) })
        .where(and(eq(detectorModels.id, id), eq(detectorModels.version, version)))
        .run().changes === 1,
    // The derivation reads a model's contact labelling only; the listed ranges are read where readings are judged.
    affected: () => [],
  },
}

export type EditOutcome =
  | { status: 200; record: Editable; cautions: Caution[]; changed: string[] }
  | { status: 400; error: string; fieldErrors: Record<string, string>; issues: Array<{ path: string; message: string }> }
  | { status: 404; error: string }
  | { status: 409; error: string; record: Editable; savedBy: { name: string | null; at: string } | null }

const invalid = (error: z.ZodError, message = 'Some fields need attention.'): EditOutcome => ({
  status: 400,
  error: message,
  fieldErrors: fieldErrorsOf(error),
  issues: error.issues.map((i) => ({ path: i.path.join('.'), message: i.message })),
})

/** Who saved the record last, for the editor whose save came too late. */
function lastSave(db: Db, kind: EditKind, id: number) {
  const row = db
    .select({ name: users.name, at: auditLog.at })
    .from(auditLog)
    .leftJoin(users, eq(users.id, auditLog.actorId))
    .where(and(eq(auditLog.entity, kind), eq(auditLog.entityId, String(id)), eq(auditLog.action, `${kind}.update`)))
    .orderBy(desc(auditLog.id))
    .limit(1)
    .get()
  return row ?? null
}

const same = (a: unknown, b: unknown) => (a ?? null) === (b ?? null)

/** The fields of the record as the edit form shows them, with the version to send back. */
export function editableRecord(db: Db, kind: EditKind, id: number): Editable | undefined {
  return SPECS[kind].read(db, id)
}

/**
 * Applies an edit sent as a whole form or as a JSON patch (fields left out keep their values; the
 * result is checked as a whole). Refusals come back as outcomes with their HTTP status.
 */
export function applyEdit(db: Db, kind: EditKind, actorId: number, id: number, raw: unknown, today: string): EditOutcome {
  const spec = SPECS[kind]
  if (typeof raw !== 'object' || raw === null || Array.isArray(raw)) {
    return { status: 400, error: 'Send the record’s fields as an object, with the version you read.', fieldErrors: {}, issues: [] }
  }
  const envelope = versionOf.safeParse(raw)
  if (!envelope.success) return invalid(envelope.error, 'Send the version you read with the change.')
  const outcome = writeTx(db, (): EditOutcome => {
    const current = spec.read(db, id)
    if (!current) return { status: 404, error: `No such ${kind}.` }
    const { version, ...fields } = current
    if (version !== envelope.data.version) {
      return {
        status: 409,
        error: `Someone else saved this ${kind} after you opened it (you had version ${envelope.data.version}, it is now ${version}). Nothing of yours was saved.`,
        record: current,
        savedBy: lastSave(db, kind, id),
      }
    }
    const sent = raw as Fields
    const unknownKeys = Object.keys(sent).filter((k) => k !== 'version' && !(k in fields))
    if (unknownKeys.length > 0) {
      return {
        status: 400,
        error: `Unknown field${unknownKeys.length > 1 ? 's' : ''}: ${unknownKeys.join(', ')}.`,
        fieldErrors: {},
        issues: unknownKeys.map((k) => ({ path: k, message: 'Not a field of this record' })),
      }
    }
    const parsed = spec.schema.safeParse({ ...fields, ...sent })
    if (!parsed.success) return invalid(parsed.error)
    const next = parsed.data
    const changedKeys = Object.keys(fields).filter((k) => !same(fields[k], next[k]))
    const cautions = spec.cautions(next)
    if (changedKeys.length === 0) return { status: 200, record: current, cautions, changed: [] }
    const changed = Object.fromEntries(changedKeys.map((k) => [k, next[k] ?? null]))
    if (!spec.write(db, id, changed, version)) {
      return { status: 409, error: `Someone else saved this ${kind} at the same moment. Nothing of yours was saved.`, record: spec.read(db, id)!, savedBy: lastSave(db, kind, id) }
    }
    writeAudit(db, {
      actorId,
      action: `${kind}.update`,
      entity: kind,
      entityId: id,
      before: Object.fromEntries(changedKeys.map((k) => [k, fields[k] ?? null])),
      after: changed,
    })
    rederive(db, spec.affected(db, id, changed), today)
    return { status: 200, record: spec.read(db, id)!, cautions, changed: changedKeys }
  })
  if (outcome.status === 200 && outcome.changed.length > 0) listsChanged()
  return outcome
}

/** The answer of an edit as the JSON API gives it. */
export function editResponse(outcome: EditOutcome): Response {
  const { status, ...body } = outcome
  return Response.json(body, { status })
}

// --- What the edit pages show around the form ---

export function monitoringChoices(db: Db) {
  return db.select({ id: monitoringCompanies.id, name: monitoringCompanies.name }).from(monitoringCompanies).orderBy(asc(monitoringCompanies.name)).all()
}

export function modelChoices(db: Db) {
  return db.select({ id: detectorModels.id, name: detectorModels.name }).from(detectorModels).orderBy(asc(detectorModels.name)).all()
}

export function siteContext(db: Db, siteId: number) {
  return db
    .select({ id: sites.id, name: sites.name, customerId: customers.id, customer: customers.name })
    .from(sites)
    .innerJoin(customers, eq(customers.id, sites.customerId))
    .where(eq(sites.id, siteId))
    .get()
}

export function unitContext(db: Db, unitId: number) {
  return db
    .select({ id: units.id, tag: units.tag, siteId: sites.id, site: sites.name })
    .from(units)
    .innerJoin(sites, eq(sites.id, units.siteId))
    .where(eq(units.id, unitId))
    .get()
}

export function detectorContext(db: Db, detectorId: number) {
  return db
    .select({ id: detectors.id, tag: detectors.tag, unitId: units.id, unit: units.tag, siteId: sites.id, site: sites.name, delayPolicySeconds: sites.delayPolicySeconds, modelId: detectors.modelId })
    .from(detectors)
    .innerJoin(units, eq(units.id, detectors.unitId))
    .innerJoin(sites, eq(sites.id, units.siteId))
    .where(eq(detectors.id, detectorId))
    .get()
}

const editBody = z.record(z.string(), z.unknown())

/** Reads an edit from a page's form or an API call's JSON and applies it: the one path for both. */
export async function editFromRequest(request: Request, kind: EditKind, actorId: number, id: number): Promise<EditOutcome> {
  if (request.method !== 'POST' && request.method !== 'PATCH') {
    throw Response.json({ error: 'Send the change with PATCH or POST.' }, { status: 405, headers: { Allow: 'GET, PATCH, POST' } })
  }
  const body = await readJsonOrForm(request, editBody)
  return applyEdit(getDb(), kind, actorId, id, body, officeToday())
}

export function modelContext(db: Db, modelId: number) {
  const model = db.select({ id: detectorModels.id, name: detectorModels.name }).from(detectorModels).where(eq(detectorModels.id, modelId)).get()
  return model && { ...model, detectors: db.select({ n: count() }).from(detectors).where(eq(detectors.modelId, modelId)).get()?.n ?? 0 }
}
