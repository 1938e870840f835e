import { checkPressure, checkVelocity, type Duct } from '~/domain/airflow'
import { contactTable, defaultContactModel } from '~/domain/contacts'
import { interlockPlan } from '~/domain/interlock'
import { detectorRequirements } from '~/domain/requirements'
import type { Db } from './db'
import { derivationInputs, deriveInput } from './derivation'
import { detectorRecord } from './repos/detector'
import type { units } from './schema'

/** The recorded duct at a unit's detectors, or null when its size is not on record. */
export function ductOf(d: Pick<typeof units.$inferSelect, 'ductShape' | 'ductWidthIn' | 'ductHeightIn' | 'ductDiameterIn'>): Duct | null {
  if (d.ductShape === 'round') return d.ductDiameterIn ? { shape: 'round', diameterIn: d.ductDiameterIn } : null
  return d.ductWidthIn && d.ductHeightIn ? { shape: 'rectangular', widthIn: d.ductWidthIn, heightIn: d.ductHeightIn } : null
}

/** Everything the device page shows, computed by the trade engine from the stored record. */
export function deviceReport(db: Db, id: number, today: string) {
  const record = detectorRecord(db, id)
  if (!record) return null
  const { device: d, readings, siblings, events } = record
  // The same derivation that wrote the stored facts: the page explains exactly what the lists show.
  const [input] = derivationInputs(db, { ids: [id] }, today)
  const derived = deriveInput(input, today)
  const { loop, schedule, delay } = derived
  const duct = ductOf(d)
  const cfm = d.position === 'supply' ? d.supplyCfm : d.returnCfm
  const velocity = duct ? checkVelocity({ cfm, duct, listedMinFpm: d.velocityMinFpm, listedMaxFpm: d.velocityMaxFpm }) : null
  const pressureReading = readings.find((r) => r.kind === 'pressure' && r.value !== null)
  const pressure = pressureReading
    ? checkPressure({ measuredInWc: pressureReading.value as number, listedMinInWc: d.pressureMinInWc, listedMaxInWc: d.pressureMaxInWc })
    : null
  const requirements = detectorRequirements({
    codeBasis: d.codeBasis,
    supplyCfm: d.supplyCfm,
    returnCfm: d.returnCfm,
    storeysServed: d.storeysServed,
    sharedPlenum: d.sharedPlenum,
    areaDetection: d.areaDetection,
    installed: {
      supply: siblings.some((s) => s.position === 'supply'),
      return: siblings.some((s) => s.position === 'return'),
      perStoreyReturns: d.storeyReturnDetectors ?? 0,
    },
  })
  return {
    device: d,
    arrangement: input.record.arrangement,
    loop,
    loopReadings: input.history.loopReadings,
    readings,
    contacts: contactTable(defaultContactModel(d.supervisoryLabelledIn, Math.min(2, d.auxContacts) as 0 | 1 | 2)),
    interlock: interlockPlan(d.shutdownInput),
    schedule,
    delay,
    velocity,
    pressure,
    requirements,
    siblings,
    risk: { score: derived.stored.riskScore, reasons: derived.reasons },
    stored: derived.stored,
    events,
  }
}
