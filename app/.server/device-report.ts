import { checkPressure, checkVelocity, type Duct } from '~/domain/airflow'
import { contactTable, defaultContactModel } from '~/domain/contacts'
import { interlockPlan } from '~/domain/interlock'
import { detectorRequirements } from '~/domain/requirements'
import type { Db } from './db'
import { derivationInputs, deriveInput } from './derivation'
import { deviceEvents, getDevice, latestReadings, siblingsOnUnit, type DeviceDetail } from './repos/devices'

export function ductOf(d: Pick<DeviceDetail, 'ductShape' | 'ductWidthIn' | 'ductHeightIn' | 'ductDiameterIn'>): Duct | null {
  if (d.ductShape === 'round') return d.ductDiameterIn ? { shape: 'round', diameterIn: d.ductDiameterIn } : null
  return d.ductWidthIn && d.ductHeightIn ? { shape: 'rectangular', widthIn: d.ductWidthIn, heightIn: d.ductHeightIn } : null
}

/** Everything the device page shows, computed by the trade engine from the stored record. */
export function deviceReport(db: Db, id: number, today: string) {
  const d = getDevice(db, id)
  if (!d) return null
  const readings = latestReadings(db, id)
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
  const siblings = siblingsOnUnit(db, d.unitId)
  const requirements = detectorRequirements({
    codeBasis: d.codeBasis,
    supplyCfm: d.supplyCfm,
    returnCfm: d.returnCfm,
    storeysServed: d.storeysServed,
    sharedPlenum: Boolean(d.sharedPlenum),
    areaDetection: Boolean(d.areaDetection),
    installed: { supply: siblings.some((s) => s.position === 'supply'), return: siblings.some((s) => s.position === 'return') },
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
    events: deviceEvents(db, id),
  }
}
