import { and, asc, desc, eq, inArray, isNotNull, max, sql } from 'drizzle-orm'
import type { Db } from '../db'
import { customers, detectorModels, detectors, events, monitoringCompanies, readings, sites, units, users, visitDetectors } from '../schema'
import { perDb } from './statements'

const EVENTS_CAP = 40

const id = sql.placeholder('id')

const statements = perDb((db: Db) => ({
  detector: db
    .select({
      id: detectors.id,
      tag: detectors.tag,
      serial: detectors.serial,
      position: detectors.position,
      headsFitted: detectors.headsFitted,
      housing: detectors.housing,
      environment: detectors.environment,
      delaySeconds: detectors.delaySeconds,
      installedOn: detectors.installedOn,
      eolOhms: detectors.eolOhms,
      eolPlacement: detectors.eolPlacement,
      eolTolerancePct: detectors.eolTolerancePct,
      alarmThresholdOhms: detectors.alarmThresholdOhms,
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
      state: detectors.state,
      lastVisualOn: detectors.lastVisualOn,
      lastFunctionalOn: detectors.lastFunctionalOn,
      lastSensitivityOn: detectors.lastSensitivityOn,
      sensitivityStreak: detectors.sensitivityStreak,
      lastCleanedOn: detectors.lastCleanedOn,
      cleaningIntervalDays: detectors.cleaningIntervalDays,
      lastResult: detectors.lastResult,
      troubles30d: detectors.troubles30d,
      version: detectors.version,
      modelName: detectorModels.name,
      supervisoryLabelledIn: detectorModels.supervisoryLabelledIn,
      auxContacts: detectorModels.auxContacts,
      standbyVa: detectorModels.standbyVa,
      alarmVa: detectorModels.alarmVa,
      unitId: units.id,
      unitTag: units.tag,
      unitKind: units.kind,
      unitLocation: units.location,
      shutdownInput: units.shutdownInput,
      supplyCfm: units.supplyCfm,
      returnCfm: units.returnCfm,
      ductShape: units.ductShape,
      ductWidthIn: units.ductWidthIn,
      ductHeightIn: units.ductHeightIn,
      ductDiameterIn: units.ductDiameterIn,
      transformerVa: units.transformerVa,
      storeysServed: units.storeysServed,
      storeyReturnDetectors: units.storeyReturnDetectors,
      sharedPlenum: units.sharedPlenum,
      areaDetection: units.areaDetection,
      siteId: sites.id,
      siteName: sites.name,
      street: sites.street,
      city: sites.city,
      region: sites.region,
      timeZone: sites.timeZone,
      delayPolicySeconds: sites.delayPolicySeconds,
      codeBasis: sites.codeBasis,
      ahjName: sites.ahjName,
      customerId: customers.id,
      customerName: customers.name,
      monitoringName: monitoringCompanies.name,
      monitoringPhone: monitoringCompanies.phone,
      monitoringAccount: sites.monitoringAccount,
    })
    .from(detectors)
    .innerJoin(detectorModels, eq(detectorModels.id, detectors.modelId))
    .innerJoin(units, eq(units.id, detectors.unitId))
    .innerJoin(sites, eq(sites.id, detectors.siteId))
    .innerJoin(customers, eq(customers.id, detectors.customerId))
    .leftJoin(monitoringCompanies, eq(monitoringCompanies.id, sites.monitoringCompanyId))
    .where(eq(detectors.id, id))
    .prepare(),
  // The most recent reading of each kind.
  readings: db
    .select({
      kind: readings.kind,
      value: readings.value,
      open: readings.open,
      takenAt: readings.takenAt,
      takenBy: users.name,
      // Loop readings are read at the panel by the fire alarm contractor; the visit's entry names them.
      readAtPanelBy: sql<string | null>`case when ${readings.kind} like 'loop-%' then json_extract(${visitDetectors.findings}, '$.loopReadBy') end`,
    })
    .from(readings)
    .leftJoin(users, eq(users.id, readings.takenBy))
    .leftJoin(visitDetectors, and(eq(visitDetectors.visitId, readings.visitId), eq(visitDetectors.detectorId, readings.detectorId)))
    .where(
      inArray(
        readings.id,
        db
          .select({ id: max(readings.id) })
          .from(readings)
          .where(eq(readings.detectorId, id))
          .groupBy(readings.kind),
      ),
    )
    .orderBy(asc(readings.kind))
    .prepare(),
  events: db
    .select({ id: events.id, occurredAt: events.occurredAt, kind: events.kind, detail: events.detail, by: users.name })
    .from(events)
    .leftJoin(users, eq(users.id, events.userId))
    .where(eq(events.detectorId, id))
    .orderBy(desc(events.occurredAt), desc(events.id))
    .limit(EVENTS_CAP)
    .prepare(),
  // The latest finished result at a visit: when it failed, the technician's reason is the office's follow-up.
  lastVisitResult: db
    .select({ visitId: visitDetectors.visitId, result: visitDetectors.result, reason: visitDetectors.resultReason, on: visitDetectors.completedAt })
    .from(visitDetectors)
    .where(and(eq(visitDetectors.detectorId, id), inArray(visitDetectors.result, ['pass', 'fail']), isNotNull(visitDetectors.completedAt)))
    .orderBy(desc(visitDetectors.completedAt), desc(visitDetectors.visitId))
    .limit(1)
    .prepare(),
  siblings: db
    .select({ id: detectors.id, tag: detectors.tag, position: detectors.position })
    .from(detectors)
    .where(eq(detectors.unitId, sql.placeholder('unitId')))
    .orderBy(desc(detectors.position), asc(detectors.id))
    .prepare(),
}))

/**
 * One detector's stored record with its model, unit, site and customer, its latest readings, its
 * latest events and the other detectors on its unit: what `deviceReport` runs the engine over.
 */
export function detectorRecord(db: Db, detectorId: number) {
  const s = statements(db)
  const device = s.detector.get({ id: detectorId })
  if (!device) return null
  return {
    device,
    readings: s.readings.all({ id: detectorId }),
    events: s.events.all({ id: detectorId }),
    followUp: followUpOf(s.lastVisitResult.get({ id: detectorId })),
    siblings: s.siblings.all({ unitId: device.unitId }),
  }
}

function followUpOf(last: { visitId: number; result: string; reason: string | null; on: string | null } | undefined) {
  return last?.result === 'fail' ? { visitId: last.visitId, reason: last.reason, on: last.on } : null
}
