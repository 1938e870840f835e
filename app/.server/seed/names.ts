// The demo scenario: Brightwater Mechanical, an invented building-services contractor, and its
// invented customers, sites and staff. Telephone numbers sit in the 555-01xx range kept for fiction;
// e-mail addresses use reserved .test domains.

export const DEMO_USERS = [
  { email: 'admin@ductkeeper.test', name: 'Ada Whitlock', role: 'admin' },
  { email: 'lead@ductkeeper.test', name: 'Priya Castellano', role: 'lead' },
  { email: 'office@ductkeeper.test', name: 'Marcus Oyelaran', role: 'office' },
  { email: 'tech@ductkeeper.test', name: 'Tomas Reyna', role: 'technician' },
  { email: 'manager@ductkeeper.test', name: 'Helen Sato', role: 'manager' },
  { email: 'jonah.keel@ductkeeper.test', name: 'Jonah Keel', role: 'technician' },
  { email: 'rosa.imbert@ductkeeper.test', name: 'Rosa Imbert', role: 'technician' },
  { email: 'wes.dunlevy@ductkeeper.test', name: 'Wes Dunlevy', role: 'technician' },
] as const

export const ROLES = [
  { key: 'admin', label: 'Administrator', description: 'Everything, plus users, roles, tokens and settings.' },
  { key: 'lead', label: 'Operations lead', description: 'Triage, audits and bulk maintenance cycles across the fleet.' },
  { key: 'office', label: 'Office', description: 'Customers, sites and equipment; schedules and reschedules visits.' },
  { key: 'technician', label: 'Technician', description: 'Reads the fleet; records work on visits assigned to them.' },
  { key: 'manager', label: 'Manager', description: 'Reads everything and receives the weekly digest.' },
] as const

export const MONITORING_COMPANIES = [
  { name: 'Northwatch Central Station', phone: '503-555-0142', email: 'dispatch@northwatch.test', method: 'phone', lead: 15 },
  { name: 'Beacon Relay Monitoring', phone: '206-555-0177', email: 'ops@beaconrelay.test', method: 'portal', lead: 30 },
  { name: 'Steadfast Alarm Receiving', phone: '614-555-0119', email: 'testmode@steadfast.test', method: 'email', lead: 60 },
  { name: 'Granite Signal Monitoring', phone: '720-555-0160', email: 'desk@granitesignal.test', method: 'phone', lead: 10 },
] as const

// Invented places set in real regions, so each site gets a real time zone and holiday calendar.
export const CITIES = [
  { city: 'Marlow Springs', region: 'US-OR', tz: 'America/Los_Angeles', zip: '97' },
  { city: 'Cedar Hollow', region: 'US-WA', tz: 'America/Los_Angeles', zip: '98' },
  { city: 'Dunmore Bay', region: 'US-CA', tz: 'America/Los_Angeles', zip: '94' },
  { city: 'Sable Ridge', region: 'US-AZ', tz: 'America/Phoenix', zip: '85' },
  { city: 'Brackett Falls', region: 'US-CO', tz: 'America/Denver', zip: '80' },
  { city: 'Ashby Junction', region: 'US-TX', tz: 'America/Chicago', zip: '75' },
  { city: 'Halverson', region: 'US-MN', tz: 'America/Chicago', zip: '55' },
  { city: 'Northgate Crossing', region: 'US-IL', tz: 'America/Chicago', zip: '60' },
  { city: 'Wrenfield', region: 'US-OH', tz: 'America/New_York', zip: '43' },
  { city: 'Fallowfield', region: 'US-PA', tz: 'America/New_York', zip: '19' },
  { city: 'Emberton', region: 'US-GA', tz: 'America/New_York', zip: '30' },
  { city: 'Port Calder', region: 'US-FL', tz: 'America/New_York', zip: '33' },
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

export const DETECTOR_MODELS = [
  // Invented demo listings; real values come from each device's own instructions.
  { name: 'Demo photo module PD-1', labelled: 'de-energized', standby: 2.4, alarm: 4.8, vmin: 300, vmax: 4000, pmin: 0.01, pmax: 1.2 },
  { name: 'Demo photo module PD-2 (two heads)', labelled: 'de-energized', standby: 3.1, alarm: 6.2, vmin: 500, vmax: 4000, pmin: 0.02, pmax: 1.0 },
  { name: 'Demo low-flow module LF-3', labelled: 'normal', standby: 2.0, alarm: 4.0, vmin: 100, vmax: 1500, pmin: 0.005, pmax: 0.6 },
] as const

export const TECH_NOTES = [
  'Heads vacuumed, tube filters replaced.',
  'Tubes checked for water, none found.',
  'Cover gasket re-seated.',
  'Key test station checked.',
  'Sampling tube re-oriented to face airflow.',
]
