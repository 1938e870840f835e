// The demo scenario: Brightwater Mechanical, an invented building-services contractor, and its
// invented customers, sites and staff. Telephone numbers sit in the 555-01xx range kept for fiction;
// e-mail addresses use reserved .test domains.

import type { UNIT_KINDS } from '~/domain/vocabulary'

type UnitKind = (typeof UNIT_KINDS)[number]

// Technicians cover neighbouring regions (ISO 3166-2, as on the sites), with some overlap so a
// region's work can go to either of two people, and say how many detectors a day holds for them.
export const DEMO_USERS = [
  { email: 'admin@ductkeeper.test', name: 'Ada Whitlock', role: 'admin' },
  { email: 'lead@ductkeeper.test', name: 'Priya Castellano', role: 'lead' },
  { email: 'office@ductkeeper.test', name: 'Marcus Oyelaran', role: 'office' },
  { email: 'tech@ductkeeper.test', name: 'Tomas Reyna', role: 'technician', regions: ['US-OR', 'US-WA', 'US-CA'], dailyCapacity: 32 },
  { email: 'manager@ductkeeper.test', name: 'Helen Sato', role: 'manager' },
  { email: 'jonah.keel@ductkeeper.test', name: 'Jonah Keel', role: 'technician', regions: ['US-CA', 'US-AZ', 'US-CO', 'US-TX'], dailyCapacity: 28 },
  { email: 'rosa.imbert@ductkeeper.test', name: 'Rosa Imbert', role: 'technician', regions: ['US-TX', 'US-MN', 'US-IL', 'US-OH'], dailyCapacity: 36 },
  { email: 'wes.dunlevy@ductkeeper.test', name: 'Wes Dunlevy', role: 'technician', regions: ['US-OH', 'US-PA', 'US-GA', 'US-FL'], dailyCapacity: 24 },
] as const

export const ROLES = [
  { key: 'admin', label: 'Administrator', description: 'Everything, plus users, roles, tokens and settings.' },
  { key: 'lead', label: 'Operations lead', description: 'Triage, audits and bulk maintenance cycles across the fleet.' },
  { key: 'office', label: 'Office', description: 'Customers, sites and equipment; schedules and reschedules visits.' },
  { key: 'technician', label: 'Technician', description: 'Reads the fleet; records work on visits assigned to them.' },
  { key: 'manager', label: 'Manager', description: 'Reads everything and receives the weekly digest.' },
] as const

export const MONITORING_COMPANIES = [
  { name: 'Northwatch Central Station', phone: '(503) 555-0142', email: 'dispatch@northwatch.test', method: 'phone', lead: 15 },
  { name: 'Beacon Relay Monitoring', phone: '(206) 555-0177', email: 'ops@beaconrelay.test', method: 'portal', lead: 30 },
  { name: 'Steadfast Alarm Receiving', phone: '(614) 555-0119', email: 'testmode@steadfast.test', method: 'email', lead: 60 },
  { name: 'Granite Signal Monitoring', phone: '(720) 555-0160', email: 'desk@granitesignal.test', method: 'phone', lead: 10 },
] as const

// Invented places set in real regions, so each site gets a real time zone and holiday calendar, and
// an area code of that region for telephone numbers (always with a 555-01xx number, kept for fiction).
export const CITIES = [
  { city: 'Marlow Springs', region: 'US-OR', tz: 'America/Los_Angeles', zip: '97', area: '503' },
  { city: 'Cedar Hollow', region: 'US-WA', tz: 'America/Los_Angeles', zip: '98', area: '206' },
  { city: 'Dunmore Bay', region: 'US-CA', tz: 'America/Los_Angeles', zip: '94', area: '415' },
  { city: 'Sable Ridge', region: 'US-AZ', tz: 'America/Phoenix', zip: '85', area: '602' },
  { city: 'Brackett Falls', region: 'US-CO', tz: 'America/Denver', zip: '80', area: '720' },
  { city: 'Ashby Junction', region: 'US-TX', tz: 'America/Chicago', zip: '75', area: '214' },
  { city: 'Halverson', region: 'US-MN', tz: 'America/Chicago', zip: '55', area: '612' },
  { city: 'Northgate Crossing', region: 'US-IL', tz: 'America/Chicago', zip: '60', area: '312' },
  { city: 'Wrenfield', region: 'US-OH', tz: 'America/New_York', zip: '43', area: '614' },
  { city: 'Fallowfield', region: 'US-PA', tz: 'America/New_York', zip: '19', area: '215' },
  { city: 'Emberton', region: 'US-GA', tz: 'America/New_York', zip: '30', area: '404' },
  { city: 'Port Calder', region: 'US-FL', tz: 'America/New_York', zip: '33', area: '305' },
] as const

export const STREETS = [
  'Alder', 'Birchmont', 'Calloway', 'Dovecote', 'Eastlake', 'Foxglove', 'Garnet', 'Heron', 'Ironwood',
  'Juniper', 'Kettle Creek', 'Lantern', 'Millrace', 'Nettle', 'Orchard', 'Pellham', 'Quarry', 'Rushmere',
  'Saltmarsh', 'Tanager', 'Upland', 'Vesper', 'Willowby', 'Yarrow',
]
export const STREET_KINDS = ['Street', 'Avenue', 'Road', 'Way', 'Boulevard', 'Lane', 'Parkway', 'Drive']

export const NAMED_CUSTOMERS = [
  { name: 'Harbor Lantern Diners', kind: 'restaurant', sitePrefix: 'Harbor Lantern' },
  { name: 'Copper Kettle Kitchens', kind: 'restaurant', sitePrefix: 'Copper Kettle' },
  { name: 'Larkmoor Commons', kind: 'retail', sitePrefix: 'Larkmoor' },
  { name: 'Meridian Row Offices', kind: 'office', sitePrefix: 'Meridian Row' },
  { name: 'Fernhill Academy Trust', kind: 'school', sitePrefix: 'Fernhill' },
  { name: 'Fig & Thistle Bistros', kind: 'restaurant', sitePrefix: 'Fig & Thistle' },
  { name: 'Quietwater Clinics', kind: 'healthcare', sitePrefix: 'Quietwater' },
  { name: 'Westbrook Outlet Centres', kind: 'retail', sitePrefix: 'Westbrook' },
] as const

// Public holidays the company closes for, named as date-holidays names them for the United States (a
// substitute day goes with its holiday). The region's other public holidays are worked.
export const OBSERVED_HOLIDAYS = ["New Year's Day", 'Memorial Day', 'Independence Day', 'Labor Day', 'Thanksgiving Day', 'Christmas Day'] as const

// Days the whole company is closed, this many days after the seed's day (moved on to a working day).
export const CLOSED_DAYS = [
  { after: 23, label: 'Company training day: duct detector testing refresher' },
  { after: 60, label: 'Shop shutdown: van stock and meter calibration' },
  { after: 95, label: 'Safety stand-down: roof access and fall protection' },
] as const

// What kind of air-handling unit each kind of customer has, as [kind, weight] pairs.
export const UNIT_MIX: Record<string, ReadonlyArray<readonly [UnitKind, number]>> = {
  restaurant: [['rtu', 3], ['mau', 1]],
  retail: [['rtu', 15], ['ahu', 3], ['erv', 2]],
  office: [['ahu', 8], ['rtu', 7], ['erv', 2], ['fcu', 3]],
  school: [['rtu', 8], ['ahu', 7], ['erv', 5]],
  healthcare: [['ahu', 11], ['rtu', 4], ['erv', 2], ['fcu', 3]],
}

// Where each kind of unit usually sits.
export const UNIT_LOCATIONS: Record<UnitKind, readonly string[]> = {
  rtu: ['Roof, north', 'Roof, south', 'Roof, east', 'Roof, west'],
  ahu: ['Mechanical room', 'Penthouse', 'Level 2 plant'],
  mau: ['Roof over kitchen', 'Roof, kitchen side'],
  erv: ['Roof, west', 'Mechanical room', 'Penthouse'],
  fcu: ['Ceiling space, corridor', 'Ceiling space, level 2', 'Above ceiling, lobby'],
}

/** True when a name uses one word twice ("Harbor Lantern Lantern Drive"), case and punctuation aside. */
export function repeatsAWord(name: string): boolean {
  const words = name.toLowerCase().split(/[^a-z0-9']+/).filter(Boolean)
  return new Set(words).size !== words.length
}

export const NAME_FIRST = [
  'Amber', 'Bluestone', 'Cobalt', 'Driftwood', 'Evergreen', 'Flint', 'Goldfinch', 'Hollow Oak', 'Indigo',
  'Jasper', 'Kingfisher', 'Lodestar', 'Maple Hill', 'Northwind', 'Oakhaven', 'Pebble', 'Quill', 'Rivermark',
  'Silverleaf', 'Thornbury', 'Umber', 'Valewood', 'Wildrose', 'Yellowpine',
]
export const NAME_SECOND: Record<string, string[]> = {
  restaurant: ['Grill Co.', 'Noodle Bars', 'Taquerias', 'Pancake Houses', 'Smokehouses', 'Kitchens'],
  retail: ['Commons', 'Plaza Holdings', 'Market Halls', 'Outlet Centres', 'Arcades'],
  office: ['Business Park', 'Tower LLC', 'Office Campus', 'Chambers'],
  school: ['Academy Trust', 'Charter Schools', 'Learning Centres'],
  healthcare: ['Clinics', 'Medical Suites', 'Care Centres'],
}
export const SITE_SUFFIX: Record<string, string[]> = {
  restaurant: ['', ''],
  retail: ['Anchor East', 'Food Court', 'North Wing', 'South Wing'],
  office: ['Building A', 'Building B', 'Annex'],
  school: ['Upper School', 'Lower School', 'Gymnasium'],
  healthcare: ['Outpatient', 'Imaging'],
}

// Orlwyn Controls is an invented maker; its ODM models stand for the usual range of photoelectric
// duct modules. Listing figures (velocity, pressure difference, sensitivity in %/ft obscuration,
// VA) are invented demo values; real ranges come from the device's listing. `housing` names the
// enclosure the model is built in, where that is not the standard one.
export const DETECTOR_MODELS = [
  { name: 'Orlwyn ODM-220 photoelectric duct module', labelled: 'de-energized', aux: 1, heads: 1, housing: null, standby: 2.2, alarm: 4.4, vmin: 300, vmax: 4000, pmin: 0.01, pmax: 1.2, slow: 0.85, shigh: 3.4 },
  { name: 'Orlwyn ODM-220R photoelectric duct module with relay board', labelled: 'de-energized', aux: 2, heads: 1, housing: null, standby: 2.6, alarm: 5.3, vmin: 300, vmax: 4000, pmin: 0.01, pmax: 1.2, slow: 0.85, shigh: 3.4 },
  { name: 'Orlwyn ODM-240R dual-head photoelectric duct module with relay board', labelled: 'de-energized', aux: 2, heads: 2, housing: null, standby: 3.3, alarm: 6.5, vmin: 500, vmax: 4000, pmin: 0.02, pmax: 1.0, slow: 0.9, shigh: 3.3 },
  { name: 'Orlwyn ODM-110L low-flow photoelectric duct module', labelled: 'normal', aux: 2, heads: 1, housing: null, standby: 2.0, alarm: 4.1, vmin: 100, vmax: 1500, pmin: 0.005, pmax: 0.6, slow: 0.8, shigh: 3.5 },
  { name: 'Orlwyn ODM-220RW photoelectric duct module with relay board, NEMA 4X housing', labelled: 'de-energized', aux: 2, heads: 1, housing: 'nema4x', standby: 2.8, alarm: 5.6, vmin: 300, vmax: 3500, pmin: 0.02, pmax: 1.0, slow: 0.85, shigh: 3.4 },
] as const

export const TECH_NOTES = [
  'Heads vacuumed, tube filters replaced.',
  'Tubes checked for water, none found.',
  'Cover gasket re-seated.',
  'Key test station checked.',
  'Sampling tube re-oriented to face airflow.',
]
