import { asc, count, desc, eq, sql } from 'drizzle-orm'
import { checkVelocity, ductVelocityFpm } from '~/domain/airflow'
import type { Awg } from '~/domain/conductors'
import { interlockPlan } from '~/domain/interlock'
import { currentFor, powerBudget, voltageDrop } from '~/domain/power'
import { detectorRequirements } from '~/domain/requirements'
import type { Db } from '../db'
import { ductOf } from '../device-report'
import { customers, detectorModels, detectors, monitoringCompanies, sites, units } from '../schema'
import { perDb } from './statements'

// A unit carries a supply and a return detector at most, bar the odd extra; the cap only guards the page.
const DETECTORS_CAP = 200

/** A unit's own record fields, as its page shows them and its edit form changes them. */
export const unitColumns = {
  tag: units.tag,
  kind: units.kind,
  location: units.location,
  shutdownInput: units.shutdownInput,
  supplyCfm: units.supplyCfm,
  returnCfm: units.returnCfm,
  ductShape: units.ductShape,
  ductWidthIn: units.ductWidthIn,
  ductHeightIn: units.ductHeightIn,
  ductDiameterIn: units.ductDiameterIn,
  storeysServed: units.storeysServed,
  storeyReturnDetectors: units.storeyReturnDetectors,
  sharedPlenum: units.sharedPlenum,
  areaDetection: units.areaDetection,
  transformerVa: units.transformerVa,
}

const id = sql.placeholder('id')
const detectorsOfUnit = eq(detectors.unitId, id)

const statements = perDb((db: Db) => ({
  unit: db
    .select({
      unit: { id: units.id, ...unitColumns },
      site: { id: sites.id, name: sites.name, city: sites.city, codeBasis: sites.codeBasis, ahjName: sites.ahjName },
      customer: { id: customers.id, name: customers.name },
      monitoring: { name: monitoringCompanies.name, phone: monitoringCompanies.phone, notifyMethod: monitoringCompanies.notifyMethod },
    })
    .from(units)
    .innerJoin(sites, eq(sites.id, units.siteId))
    .innerJoin(customers, eq(customers.id, sites.customerId))
    .leftJoin(monitoringCompanies, eq(monitoringCompanies.id, sites.monitoringCompanyId))
    .where(eq(units.id, id))
    .prepare(),
  detectors: db
    .select({
      id: detectors.id,
      tag: detectors.tag,
      position: detectors.position,
      state: detectors.state,
      due: detectors.dueStatus,
      nextDueOn: detectors.nextDueOn,
      risk: detectors.riskScore,
      conductorAwg: detectors.conductorAwg,
      conductorStranded: detectors.conductorStranded,
      testStation: detectors.testStation,
      testStationFeet: detectors.testStationFeet,
      velocityMinFpm: detectors.velocityMinFpm,
      velocityMaxFpm: detectors.velocityMaxFpm,
      model: detectorModels.name,
      standbyVa: detectorModels.standbyVa,
      alarmVa: detectorModels.alarmVa,
    })
    .from(detectors)
    .innerJoin(detectorModels, eq(detectorModels.id, detectors.modelId))
    .where(detectorsOfUnit)
    .orderBy(desc(detectors.position), asc(detectors.tag), asc(detectors.id))
    .limit(DETECTORS_CAP)
    .prepare(),
  detectorCount: db.select({ n: count() }).from(detectors).where(detectorsOfUnit).prepare(),
}))

/**
 * A unit as its page and `/api/units/:id` show it: the record, its detectors, and what the trade
 * engine makes of them (duct velocity, shutdown interlock, required detectors, 24 VAC power budget).
 */
export function unitRecord(db: Db, unitId: number) {
  const s = statements(db)
  const head = s.unit.get({ id: unitId })
  if (!head) return null
  const { unit } = head
  const rows = s.detectors.all({ id: unitId })
  const duct = ductOf(unit)
  const cfmAt = (position: 'supply' | 'return') => (position === 'supply' ? unit.supplyCfm : unit.returnCfm)
  // Detectors at each storey's return sit on the riser, not on the unit's own ducts: counted from the unit's record.
  const installed = { supply: rows.some((d) => d.position === 'supply'), return: rows.some((d) => d.position === 'return'), perStoreyReturns: unit.storeyReturnDetectors ?? 0 }
  return {
    ...head,
    duct,
    velocity: duct ? { supplyFpm: ductVelocityFpm(unit.supplyCfm, duct), returnFpm: ductVelocityFpm(unit.returnCfm, duct) } : null,
    interlock: interlockPlan(unit.shutdownInput),
    // The same inputs the detector page uses, so a unit reads the same from either page.
    requirements: detectorRequirements({
      codeBasis: head.site.codeBasis,
      supplyCfm: unit.supplyCfm,
      returnCfm: unit.returnCfm,
      storeysServed: unit.storeysServed,
      sharedPlenum: unit.sharedPlenum,
      areaDetection: unit.areaDetection,
      installed,
    }),
    // Remote test stations have no draw on record, so they add nothing to the budget.
    power: powerBudget({
      transformerVa: unit.transformerVa,
      loads: rows.map((d) => ({ label: d.tag, standbyVa: d.standbyVa, alarmVa: d.alarmVa })),
    }),
    detectors: {
      rows: rows.map((d) => {
        const alarmA = currentFor(d.alarmVa)
        return {
          ...d,
          velocity: duct
            ? checkVelocity({ cfm: cfmAt(d.position), duct, listedMinFpm: d.velocityMinFpm, listedMaxFpm: d.velocityMaxFpm })
            : null,
          // Without the station's own draw, the detector's full alarm current is the worst the run can carry.
          stationDrop:
            d.testStation !== 'none' && d.testStationFeet
              ? {
                  currentA: alarmA,
                  ...voltageDrop({ currentA: alarmA, oneWayFeet: d.testStationFeet, awg: d.conductorAwg as Awg, stranded: d.conductorStranded }),
                }
              : null,
        }
      }),
      total: s.detectorCount.get({ id: unitId })!.n,
    },
  }
}
