import type { Db } from '../db'

export interface DeviceDetail {
  id: number
  tag: string
  serial: string | null
  position: 'supply' | 'return'
  headsFitted: number
  housing: 'standard' | 'nema4' | 'nema4x'
  environment: 'clean' | 'dusty' | 'kitchen' | 'humid'
  delaySeconds: number | null
  installedOn: string
  eolOhms: number
  eolPlacement: 'through-supervisory' | 'across-pair'
  alarmTerminal: 'NO' | 'NC'
  supervisoryTerminal: 'NO' | 'NC'
  conductorAwg: 18 | 16 | 14 | 12
  conductorStranded: number
  runFeet: number
  testStation: 'none' | 'key' | 'magnet'
  testStationFeet: number | null
  velocityMinFpm: number
  velocityMaxFpm: number
  pressureMinInWc: number
  pressureMaxInWc: number
  state: 'normal' | 'alarm' | 'trouble' | 'supervisory' | 'out-of-service'
  lastVisualOn: string | null
  lastFunctionalOn: string | null
  lastSensitivityOn: string | null
  sensitivityStreak: number
  lastCleanedOn: string | null
  cleaningIntervalDays: number | null
  lastResult: 'pass' | 'fail' | null
  troubles30d: number
  version: number
  modelName: string
  supervisoryLabelledIn: 'de-energized' | 'normal'
  auxContacts: number
  standbyVa: number
  alarmVa: number
  unitId: number
  unitTag: string
  unitKind: string
  unitLocation: string | null
  shutdownInput: 'break-to-stop' | 'make-to-stop'
  supplyCfm: number
  returnCfm: number
  ductShape: 'rectangular' | 'round'
  ductWidthIn: number | null
  ductHeightIn: number | null
  ductDiameterIn: number | null
  transformerVa: number
  storeysServed: number
  sharedPlenum: number
  areaDetection: number
  siteId: number
  siteName: string
  street: string
  city: string
  region: string
  timeZone: string
  delayPolicySeconds: number
  codeBasis: 'nfpa90a' | 'imc'
  ahjName: string
  customerId: number
  customerName: string
  monitoringName: string | null
  monitoringPhone: string | null
  monitoringAccount: string | null
}

export function getDevice(db: Db, id: number): DeviceDetail | undefined {
  return db.$client
    .prepare(
      `select d.id, d.tag, d.serial, d.position, d.heads_fitted as headsFitted, d.housing, d.environment,
              d.delay_seconds as delaySeconds, d.installed_on as installedOn, d.eol_ohms as eolOhms,
              d.eol_placement as eolPlacement, d.alarm_terminal as alarmTerminal, d.supervisory_terminal as supervisoryTerminal,
              d.conductor_awg as conductorAwg, d.conductor_stranded as conductorStranded, d.run_feet as runFeet,
              d.test_station as testStation, d.test_station_feet as testStationFeet,
              d.velocity_min_fpm as velocityMinFpm, d.velocity_max_fpm as velocityMaxFpm,
              d.pressure_min_in_wc as pressureMinInWc, d.pressure_max_in_wc as pressureMaxInWc, d.state,
              d.last_visual_on as lastVisualOn, d.last_functional_on as lastFunctionalOn,
              d.last_sensitivity_on as lastSensitivityOn, d.sensitivity_streak as sensitivityStreak,
              d.last_cleaned_on as lastCleanedOn, d.cleaning_interval_days as cleaningIntervalDays,
              d.last_result as lastResult, d.troubles_30d as troubles30d, d.version,
              m.name as modelName, m.supervisory_labelled_in as supervisoryLabelledIn, m.aux_contacts as auxContacts,
              m.standby_va as standbyVa, m.alarm_va as alarmVa,
              u.id as unitId, u.tag as unitTag, u.kind as unitKind, u.location as unitLocation, u.shutdown_input as shutdownInput,
              u.supply_cfm as supplyCfm, u.return_cfm as returnCfm, u.duct_shape as ductShape, u.duct_width_in as ductWidthIn,
              u.duct_height_in as ductHeightIn, u.duct_diameter_in as ductDiameterIn, u.transformer_va as transformerVa,
              u.storeys_served as storeysServed, u.shared_plenum as sharedPlenum, u.area_detection as areaDetection,
              s.id as siteId, s.name as siteName, s.street, s.city, s.region, s.time_zone as timeZone,
              s.delay_policy_seconds as delayPolicySeconds, s.code_basis as codeBasis, s.ahj_name as ahjName,
              c.id as customerId, c.name as customerName,
              mc.name as monitoringName, mc.phone as monitoringPhone, s.monitoring_account as monitoringAccount
       from detectors d
       join detector_models m on m.id = d.model_id
       join units u on u.id = d.unit_id
       join sites s on s.id = d.site_id
       join customers c on c.id = d.customer_id
       left join monitoring_companies mc on mc.id = s.monitoring_company_id
       where d.id = ?`,
    )
    .get(id) as DeviceDetail | undefined
}

export interface ReadingRow {
  kind: string
  value: number | null
  open: number
  takenAt: string
  takenBy: string | null
}

/** The most recent reading of each kind, from the latest session of readings. */
export function latestReadings(db: Db, detectorId: number): ReadingRow[] {
  return db.$client
    .prepare(
      `select r.kind, r.value, r.open, r.taken_at as takenAt, u.name as takenBy
       from readings r left join users u on u.id = r.taken_by
       where r.id in (select max(id) from readings where detector_id = ? group by kind)
       order by r.kind`,
    )
    .all(detectorId) as ReadingRow[]
}

export interface EventRow {
  id: number
  occurredAt: string
  kind: string
  detail: string | null
  by: string | null
}

export function deviceEvents(db: Db, detectorId: number, limit = 40): EventRow[] {
  return db.$client
    .prepare(
      `select e.id, e.occurred_at as occurredAt, e.kind, e.detail, u.name as by
       from events e left join users u on u.id = e.user_id
       where e.detector_id = ? order by e.occurred_at desc limit ?`,
    )
    .all(detectorId, limit) as EventRow[]
}

export function siblingsOnUnit(db: Db, unitId: number) {
  return db.$client
    .prepare('select id, tag, position from detectors where unit_id = ? order by position desc')
    .all(unitId) as Array<{ id: number; tag: string; position: 'supply' | 'return' }>
}
