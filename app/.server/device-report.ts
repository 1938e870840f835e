import { checkPressure, checkVelocity, type Duct } from '~/domain/airflow'
import { contactTable, defaultContactModel } from '~/domain/contacts'
import { daysBetween } from '~/domain/dates'
import { auditDelay } from '~/domain/delay-audit'
import { interlockPlan } from '~/domain/interlock'
import { diagnose, type Arrangement, type Readings } from '~/domain/loop'
import { detectorRequirements } from '~/domain/requirements'
import { dueTasks } from '~/domain/schedule'
import { triage } from '~/domain/triage'
import type { Db } from './db'
import { deviceEvents, getDevice, latestReadings, siblingsOnUnit, type DeviceDetail } from './repos/devices'

const LOOP_STATES = { 'loop-normal': 'normal', 'loop-alarm': 'alarm', 'loop-trouble': 'trouble', 'loop-unpowered': 'unpowered' } as const

export function arrangementOf(d: DeviceDetail): Arrangement {
  return {
    eolOhms: d.eolOhms,
    eolPlacement: d.eolPlacement,
    alarmTerminal: d.alarmTerminal,
    supervisoryTerminal: d.supervisoryTerminal,
    supervisoryLabelledIn: d.supervisoryLabelledIn,
    conductor: { awg: d.conductorAwg, stranded: Boolean(d.conductorStranded), oneWayFeet: d.runFeet },
    measuredAt: 'panel',
  }
}

export function ductOf(d: Pick<DeviceDetail, 'ductShape' | 'ductWidthIn' | 'ductHeightIn' | 'ductDiameterIn'>): Duct | null {
  if (d.ductShape === 'round') return d.ductDiameterIn ? { shape: 'round', diameterIn: d.ductDiameterIn } : null
  return d.ductWidthIn && d.ductHeightIn ? { shape: 'rectangular', widthIn: d.ductWidthIn, heightIn: d.ductHeightIn } : null
}

/** Everything the device page shows, computed by the trade engine from the stored record. */
export function deviceReport(db: Db, id: number, today: string) {
  const d = getDevice(db, id)
  if (!d) return null
  const readings = latestReadings(db, id)
  const loopReadings: Readings = {}
  for (const r of readings) {
    const state = LOOP_STATES[r.kind as keyof typeof LOOP_STATES]
    if (state) loopReadings[state] = r.open ? 'open' : (r.value as number)
  }
  const arrangement = arrangementOf(d)
  const loop = diagnose(arrangement, loopReadings)
  const schedule = dueTasks(
    {
      installedOn: d.installedOn,
      environment: d.environment,
      lastVisualOn: d.lastVisualOn,
      lastFunctionalOn: d.lastFunctionalOn,
      lastSensitivityOn: d.lastSensitivityOn,
      sensitivityStreak: d.sensitivityStreak,
      lastCleanedOn: d.lastCleanedOn,
      cleaningIntervalDays: d.cleaningIntervalDays,
    },
    today,
  )
  const delay = auditDelay({ delaySeconds: d.delaySeconds, policySeconds: d.delayPolicySeconds })
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
  const worst = schedule[0]
  const risk = triage({
    state: d.state,
    dueStatus: worst.status,
    daysOverdue: Math.max(0, daysBetween(worst.dueOn, today)),
    lastResult: d.lastResult,
    diagnosisFailed: loop.verdict === 'fail',
    troubles30d: d.troubles30d,
    environment: d.environment,
    housing: d.housing,
    delayAgreement: delay.agreement,
  })
  return {
    device: d,
    arrangement,
    loop,
    loopReadings,
    readings,
    contacts: contactTable(defaultContactModel(d.supervisoryLabelledIn, Math.min(2, d.auxContacts) as 0 | 1 | 2)),
    interlock: interlockPlan(d.shutdownInput),
    schedule,
    delay,
    velocity,
    pressure,
    requirements,
    siblings,
    risk,
    events: deviceEvents(db, id),
  }
}
