import { sql } from 'drizzle-orm'
import { index, integer, primaryKey, real, sqliteTable, text, uniqueIndex } from 'drizzle-orm/sqlite-core'
import { ROLE_KEYS } from '~/domain/permissions'
import {
  CAPACITY_UNITS,
  CODE_BASES,
  CUSTOMER_KINDS,
  DELAY_AGREEMENTS,
  DETECTOR_STATES,
  DUCT_SHAPES,
  DUE_STATUSES,
  ENVIRONMENTS,
  EOL_PLACEMENTS,
  EVENT_KINDS,
  HOUSINGS,
  LABELLINGS,
  LOOP_VERDICTS,
  NOTIFY_METHODS,
  OUTBOX_STATUSES,
  OUTCOMES,
  POSITIONS,
  READING_KINDS,
  REASON_CODES,
  SHUTDOWN_INPUTS,
  VISIT_TASKS,
  TERMINALS,
  TEST_STATIONS,
  UNIT_KINDS,
  VISIT_KINDS,
  VISIT_RESULTS,
  VISIT_STATUSES,
} from '~/domain/vocabulary'

// Dates of work (tests, visits) are calendar days as 'YYYY-MM-DD' text in the site's own time zone;
// instants (events, sessions, audit) are ISO-8601 UTC text. Both sort correctly as text.
const id = () => integer('id').primaryKey({ autoIncrement: true })
const createdAt = () =>
  text('created_at')
    .notNull()
    .default(sql`(strftime('%Y-%m-%dT%H:%M:%fZ','now'))`)

export const monitoringCompanies = sqliteTable('monitoring_companies', {
  id: id(),
  name: text('name').notNull(),
  phone: text('phone').notNull(),
  email: text('email'),
  // How the central station wants to hear about work before it starts.
  notifyMethod: text('notify_method', { enum: NOTIFY_METHODS }).notNull(),
  notifyLeadMinutes: integer('notify_lead_minutes').notNull().default(15),
  hours: text('hours').notNull().default('24/7'),
  notes: text('notes'),
  createdAt: createdAt(),
})

export const customers = sqliteTable(
  'customers',
  {
    id: id(),
    name: text('name').notNull(),
    kind: text('kind', { enum: CUSTOMER_KINDS }).notNull(),
    contactName: text('contact_name'),
    contactEmail: text('contact_email'),
    contactPhone: text('contact_phone'),
    version: integer('version').notNull().default(1),
    createdAt: createdAt(),
  },
  // A list sorted by a column walks its index (column, then the rowid: the list's tie-break); a
  // list filtered by one and in its own order walks (column, own order). So here and below.
  (t) => [index('customers_name_idx').on(t.name), index('customers_kind_idx').on(t.kind), index('customers_kind_name_idx').on(t.kind, t.name)],
)

export const sites = sqliteTable(
  'sites',
  {
    id: id(),
    customerId: integer('customer_id')
      .notNull()
      .references(() => customers.id),
    name: text('name').notNull(),
    street: text('street').notNull(),
    city: text('city').notNull(),
    // ISO 3166-2 subdivision such as 'US-OR': picks the public-holiday calendar for the site.
    region: text('region').notNull(),
    postalCode: text('postal_code').notNull(),
    timeZone: text('time_zone').notNull(),
    jurisdiction: text('jurisdiction').notNull(),
    ahjName: text('ahj_name').notNull(),
    ahjContact: text('ahj_contact'),
    codeBasis: text('code_basis', { enum: CODE_BASES }).notNull(),
    monitoringCompanyId: integer('monitoring_company_id').references(() => monitoringCompanies.id),
    monitoringAccount: text('monitoring_account'),
    // The reporting delay agreed with the monitoring company, in seconds (0 = report at once).
    delayPolicySeconds: integer('delay_policy_seconds').notNull().default(0),
    // The site keeps records of nuisance alarms: only then may sensitivity tests stretch to the longer interval.
    keepsNuisanceRecords: integer('keeps_nuisance_records', { mode: 'boolean' }).notNull().default(false),
    accessNotes: text('access_notes'),
    version: integer('version').notNull().default(1),
    createdAt: createdAt(),
  },
  (t) => [
    index('sites_customer_idx').on(t.customerId, t.name),
    index('sites_region_idx').on(t.region),
    index('sites_monitoring_idx').on(t.monitoringCompanyId),
    // Each list order an index walk, as is a page of visits, detectors or units sorted by their
    // site's name or town.
    index('sites_name_idx').on(t.name),
    index('sites_city_idx').on(t.city),
    index('sites_code_basis_idx').on(t.codeBasis),
    index('sites_code_basis_name_idx').on(t.codeBasis, t.name),
    index('sites_delay_policy_idx').on(t.delayPolicySeconds),
  ],
)

export const units = sqliteTable(
  'units',
  {
    id: id(),
    siteId: integer('site_id')
      .notNull()
      .references(() => sites.id),
    tag: text('tag').notNull(),
    kind: text('kind', { enum: UNIT_KINDS }).notNull(),
    location: text('location'),
    shutdownInput: text('shutdown_input', { enum: SHUTDOWN_INPUTS }).notNull(),
    supplyCfm: integer('supply_cfm').notNull(),
    returnCfm: integer('return_cfm').notNull(),
    ductShape: text('duct_shape', { enum: DUCT_SHAPES }).notNull(),
    ductWidthIn: real('duct_width_in'),
    ductHeightIn: real('duct_height_in'),
    ductDiameterIn: real('duct_diameter_in'),
    storeysServed: integer('storeys_served').notNull().default(1),
    // Detectors fitted at each storey's return before it joins the common return; null when not recorded.
    storeyReturnDetectors: integer('storey_return_detectors'),
    sharedPlenum: integer('shared_plenum', { mode: 'boolean' }).notNull().default(false),
    areaDetection: integer('area_detection', { mode: 'boolean' }).notNull().default(false),
    transformerVa: integer('transformer_va').notNull().default(40),
    version: integer('version').notNull().default(1),
    createdAt: createdAt(),
  },
  (t) => [index('units_site_idx').on(t.siteId, t.tag), index('units_tag_idx').on(t.tag)],
)

// A listing: what one make of module is rated for. Values are set per model by the office from the
// device's own instructions; the demo carries invented models.
export const detectorModels = sqliteTable('detector_models', {
  id: id(),
  name: text('name').notNull().unique(),
  supervisoryLabelledIn: text('supervisory_labelled_in', { enum: LABELLINGS })
    .notNull()
    .default('de-energized'),
  auxContacts: integer('aux_contacts').notNull().default(2),
  standbyVa: real('standby_va').notNull(),
  alarmVa: real('alarm_va').notNull(),
  velocityMinFpm: integer('velocity_min_fpm').notNull(),
  velocityMaxFpm: integer('velocity_max_fpm').notNull(),
  pressureMinInWc: real('pressure_min_in_wc').notNull(),
  pressureMaxInWc: real('pressure_max_in_wc').notNull(),
  // The sensitivity range on the listing, in %/ft obscuration; null until the office enters it.
  sensitivityLowPctFt: real('sensitivity_low_pct_ft'),
  sensitivityHighPctFt: real('sensitivity_high_pct_ft'),
  version: integer('version').notNull().default(1),
})

export const detectors = sqliteTable(
  'detectors',
  {
    id: id(),
    unitId: integer('unit_id')
      .notNull()
      .references(() => units.id),
    // Copied from the unit so the console can filter a fleet by site or customer with one index.
    siteId: integer('site_id')
      .notNull()
      .references(() => sites.id),
    customerId: integer('customer_id')
      .notNull()
      .references(() => customers.id),
    modelId: integer('model_id')
      .notNull()
      .references(() => detectorModels.id),
    tag: text('tag').notNull(),
    serial: text('serial'),
    position: text('position', { enum: POSITIONS }).notNull(),
    headsFitted: integer('heads_fitted').notNull().default(1),
    housing: text('housing', { enum: HOUSINGS }).notNull(),
    environment: text('environment', { enum: ENVIRONMENTS }).notNull(),
    // Set on the module's switches; null when nobody has recorded it.
    delaySeconds: integer('delay_seconds'),
    delayObservedOn: text('delay_observed_on'),
    installedOn: text('installed_on').notNull(),
    eolOhms: integer('eol_ohms').notNull(),
    eolPlacement: text('eol_placement', { enum: EOL_PLACEMENTS }).notNull(),
    // The resistor's marked tolerance in percent; null means the usual 5 %.
    eolTolerancePct: real('eol_tolerance_pct'),
    // The panel input's alarm threshold in ohms, from the panel's documentation; null means not recorded.
    alarmThresholdOhms: integer('alarm_threshold_ohms'),
    alarmTerminal: text('alarm_terminal', { enum: TERMINALS }).notNull(),
    supervisoryTerminal: text('supervisory_terminal', { enum: TERMINALS }).notNull(),
    conductorAwg: integer('conductor_awg').notNull(),
    conductorStranded: integer('conductor_stranded', { mode: 'boolean' }).notNull(),
    runFeet: integer('run_feet').notNull(),
    testStation: text('test_station', { enum: TEST_STATIONS }).notNull().default('none'),
    testStationFeet: integer('test_station_feet'),
    velocityMinFpm: integer('velocity_min_fpm').notNull(),
    velocityMaxFpm: integer('velocity_max_fpm').notNull(),
    pressureMinInWc: real('pressure_min_in_wc').notNull(),
    pressureMaxInWc: real('pressure_max_in_wc').notNull(),
    state: text('state', { enum: DETECTOR_STATES }).notNull().default('normal'),
    lastVisualOn: text('last_visual_on'),
    lastFunctionalOn: text('last_functional_on'),
    lastSensitivityOn: text('last_sensitivity_on'),
    // Sensitivity tests passed in range in a row: two or more allow the longer interval.
    sensitivityStreak: integer('sensitivity_streak').notNull().default(0),
    lastCleanedOn: text('last_cleaned_on'),
    cleaningIntervalDays: integer('cleaning_interval_days'),
    lastResult: text('last_result', { enum: OUTCOMES }),
    // Kept in step by the writes (from the trade engine) so the fleet can be filtered and sorted in SQL.
    nextVisualOn: text('next_visual_on'),
    nextFunctionalOn: text('next_functional_on'),
    nextSensitivityOn: text('next_sensitivity_on'),
    nextCleaningOn: text('next_cleaning_on'),
    nextDueOn: text('next_due_on'),
    dueStatus: text('due_status', { enum: DUE_STATUSES }).notNull().default('ok'),
    delayAgreement: text('delay_agreement', { enum: DELAY_AGREEMENTS })
      .notNull()
      .default('unknown'),
    riskScore: integer('risk_score').notNull().default(0),
    // The engine's reason codes behind the score, as ',code,code,' so one reason filters with LIKE.
    riskReasons: text('risk_reasons').notNull().default(''),
    // The last loop diagnosis from the engine, kept so the triage queue can filter on it in SQL.
    loopVerdict: text('loop_verdict', { enum: LOOP_VERDICTS }),
    // The diagnosis's finding codes, comma separated; empty when the loop passed or was not measured.
    loopFindings: text('loop_findings').notNull().default(''),
    assignedTo: integer('assigned_to').references(() => users.id),
    acknowledgedAt: text('acknowledged_at'),
    acknowledgedBy: integer('acknowledged_by').references(() => users.id),
    troubles30d: integer('troubles_30d').notNull().default(0),
    version: integer('version').notNull().default(1),
    updatedAt: text('updated_at')
      .notNull()
      .default(sql`(strftime('%Y-%m-%dT%H:%M:%fZ','now'))`),
  },
  (t) => [
    index('detectors_unit_idx').on(t.unitId),
    index('detectors_site_idx').on(t.siteId, t.tag),
    index('detectors_customer_idx').on(t.customerId),
    // The Detectors list sorted by a column walks that column's index (then the rowid, the list's
    // tie-break); filtered by one, in its own order (risk), it walks (column, risk score).
    index('detectors_state_idx').on(t.state, t.riskScore),
    index('detectors_state_sort_idx').on(t.state),
    index('detectors_due_idx').on(t.dueStatus, t.nextDueOn),
    index('detectors_due_sort_idx').on(t.dueStatus),
    index('detectors_due_risk_idx').on(t.dueStatus, t.riskScore),
    // The overview's overdue count per environment, read from the index alone.
    index('detectors_due_env_idx').on(t.dueStatus, t.environment),
    index('detectors_next_due_idx').on(t.nextDueOn),
    index('detectors_risk_idx').on(t.riskScore),
    index('detectors_env_idx').on(t.environment, t.housing),
    index('detectors_env_sort_idx').on(t.environment),
    index('detectors_env_risk_idx').on(t.environment, t.riskScore),
    index('detectors_housing_risk_idx').on(t.housing, t.riskScore),
    index('detectors_delay_idx').on(t.delayAgreement),
    index('detectors_delay_risk_idx').on(t.delayAgreement, t.riskScore),
    index('detectors_loop_idx').on(t.loopVerdict),
    index('detectors_loop_risk_idx').on(t.loopVerdict, t.riskScore),
    index('detectors_position_idx').on(t.position),
    index('detectors_last_functional_idx').on(t.lastFunctionalOn),
    index('detectors_installed_idx').on(t.installedOn),
    index('detectors_tag_idx').on(t.tag),
    index('detectors_assigned_idx').on(t.assignedTo),
    // Per-customer and per-site overdue and trouble counts, which the lists sort on.
    index('detectors_customer_due_idx').on(t.customerId, t.dueStatus, t.state),
    index('detectors_customer_state_idx').on(t.customerId, t.state),
    index('detectors_site_due_idx').on(t.siteId, t.dueStatus),
    // Triage by one reason: the open detectors holding it, by score. Matched by the queue's own
    // `like` on the stored codes (app/.server/lists/triage.ts), written with the code as a literal.
    // Triage's open queue in each order its page offers: a walk that never steps over a closed one.
    index('detectors_open_risk_idx').on(t.riskScore).where(sql.raw(`risk_reasons <> ''`)),
    index('detectors_open_state_idx').on(t.state).where(sql.raw(`risk_reasons <> ''`)),
    index('detectors_open_due_idx').on(t.dueStatus).where(sql.raw(`risk_reasons <> ''`)),
    index('detectors_open_tag_idx').on(t.tag).where(sql.raw(`risk_reasons <> ''`)),
    ...REASON_CODES.map((code) =>
      index(`detectors_reason_${code.replaceAll('-', '_')}_idx`)
        .on(t.riskScore)
        .where(sql.raw(`risk_reasons like '%,${code},%'`)),
    ),
  ],
)

export const users = sqliteTable('users', {
  id: id(),
  email: text('email').notNull().unique(),
  name: text('name').notNull(),
  role: text('role', { enum: ROLE_KEYS })
    .notNull()
    .references(() => roles.key),
  active: integer('active', { mode: 'boolean' }).notNull().default(true),
  // For technicians: the site regions they cover (comma list of ISO 3166-2 codes) and how much
  // work one day holds, counted in detectors or in visits.
  regions: text('regions'),
  dailyCapacity: integer('daily_capacity'),
  capacityUnit: text('capacity_unit', { enum: CAPACITY_UNITS }).notNull().default('detectors'),
  createdAt: createdAt(),
})

export const roles = sqliteTable('roles', {
  key: text('key').primaryKey(),
  label: text('label').notNull(),
  description: text('description').notNull(),
})

export const visits = sqliteTable(
  'visits',
  {
    id: id(),
    siteId: integer('site_id')
      .notNull()
      .references(() => sites.id),
    kind: text('kind', { enum: VISIT_KINDS }).notNull(),
    scheduledOn: text('scheduled_on').notNull(),
    technicianId: integer('technician_id').references(() => users.id),
    status: text('status', { enum: VISIT_STATUSES })
      .notNull()
      .default('planned'),
    notes: text('notes'),
    // The time window agreed with the site, as 'HH:MM' in the site's time zone.
    windowFrom: text('window_from'),
    windowUntil: text('window_until'),
    startedAt: text('started_at'),
    completedAt: text('completed_at'),
    cancelledAt: text('cancelled_at'),
    cancelReason: text('cancel_reason'),
    createdBy: integer('created_by').references(() => users.id),
    version: integer('version').notNull().default(1),
    createdAt: createdAt(),
  },
  (t) => [
    index('visits_site_idx').on(t.siteId, t.scheduledOn),
    index('visits_date_idx').on(t.scheduledOn, t.status),
    index('visits_tech_idx').on(t.technicianId, t.scheduledOn),
    // Sorted by kind or status: (column, rowid); filtered by one, in the list's own order (the day).
    index('visits_kind_idx').on(t.kind),
    index('visits_kind_day_idx').on(t.kind, t.scheduledOn),
    index('visits_status_idx').on(t.status),
    index('visits_status_day_idx').on(t.status, t.scheduledOn),
  ],
)

export const visitDetectors = sqliteTable(
  'visit_detectors',
  {
    visitId: integer('visit_id')
      .notNull()
      .references(() => visits.id, { onDelete: 'cascade' }),
    detectorId: integer('detector_id')
      .notNull()
      .references(() => detectors.id),
    tasks: text('tasks').notNull(), // comma list: visual,functional,sensitivity,cleaning
    result: text('result', { enum: VISIT_RESULTS })
      .notNull()
      .default('pending'),
    notes: text('notes'),
    // Why it failed or was not tested, in the technician's words: the office's follow-up reads it.
    resultReason: text('result_reason'),
    // What the technician found beyond the readings (signal at the panel, unit shut down, reset,
    // delay as found, test station, heads fitted), as recorded by the visit form.
    findings: text('findings', { mode: 'json' }),
    completedAt: text('completed_at'),
  },
  (t) => [primaryKey({ columns: [t.visitId, t.detectorId] }), index('visit_detectors_detector_idx').on(t.detectorId)],
)

// The history of work: one row per task done on a detector at a visit. A detector's last-test and
// last-cleaning dates, last result and sensitivity streak are read from here (see app/domain/derive.ts).
export const taskResults = sqliteTable(
  'task_results',
  {
    id: id(),
    detectorId: integer('detector_id')
      .notNull()
      .references(() => detectors.id),
    visitId: integer('visit_id')
      .notNull()
      .references(() => visits.id),
    task: text('task', { enum: VISIT_TASKS }).notNull(),
    doneOn: text('done_on').notNull(),
    // A cleaning passes when done; a sensitivity test passes when the reading is inside the listed range.
    outcome: text('outcome', { enum: OUTCOMES }).notNull(),
    // The sensitivity reading in %/ft obscuration, where the task measured one.
    value: real('value'),
    notes: text('notes'),
    recordedBy: integer('recorded_by').references(() => users.id),
    recordedAt: createdAt(),
  },
  (t) => [
    // Covers the derivation's read of a detector's history (outcome included: no table lookups).
    index('task_results_history_idx').on(t.detectorId, t.task, t.doneOn, t.outcome),
    index('task_results_visit_idx').on(t.visitId),
    // The digest's "failed since last week": few rows, found by day without walking every result.
    index('task_results_fail_idx').on(t.doneOn, t.visitId).where(sql`outcome = 'fail'`),
  ],
)

export const readings = sqliteTable(
  'readings',
  {
    id: id(),
    detectorId: integer('detector_id')
      .notNull()
      .references(() => detectors.id),
    visitId: integer('visit_id').references(() => visits.id),
    takenAt: text('taken_at').notNull(),
    // loop-* in ohms (open = over-range), input-* in volts AC, velocity in ft/min,
    // pressure in inches of water column, sensitivity in %/ft obscuration.
    kind: text('kind', { enum: READING_KINDS }).notNull(),
    value: real('value'),
    open: integer('open', { mode: 'boolean' }).notNull().default(false),
    takenBy: integer('taken_by').references(() => users.id),
  },
  (t) => [
    index('readings_detector_idx').on(t.detectorId, t.takenAt),
    // A visit's own readings, for its page and record (a scan of every reading without it).
    index('readings_visit_idx').on(t.visitId, t.detectorId),
  ],
)

export const notifications = sqliteTable(
  'notifications',
  {
    id: id(),
    siteId: integer('site_id')
      .notNull()
      .references(() => sites.id),
    visitId: integer('visit_id').references(() => visits.id),
    monitoringCompanyId: integer('monitoring_company_id').references(() => monitoringCompanies.id),
    notifiedAt: text('notified_at').notNull(),
    notifiedBy: integer('notified_by').references(() => users.id),
    method: text('method', { enum: NOTIFY_METHODS }).notNull(),
    spokeWith: text('spoke_with').notNull(),
    confirmation: text('confirmation'),
    inTestFrom: text('in_test_from').notNull(),
    inTestUntil: text('in_test_until').notNull(),
    siteContactTold: text('site_contact_told'),
    // The all-clear: the system taken out of test, who at the monitoring company confirmed, who logged it.
    clearedAt: text('cleared_at'),
    clearedWith: text('cleared_with'),
    clearedBy: integer('cleared_by').references(() => users.id),
  },
  (t) => [index('notifications_site_idx').on(t.siteId, t.notifiedAt), index('notifications_visit_idx').on(t.visitId)],
)

export const events = sqliteTable(
  'events',
  {
    id: id(),
    siteId: integer('site_id')
      .notNull()
      .references(() => sites.id),
    detectorId: integer('detector_id').references(() => detectors.id),
    occurredAt: text('occurred_at').notNull(),
    kind: text('kind', { enum: EVENT_KINDS }).notNull(),
    detail: text('detail'),
    userId: integer('user_id').references(() => users.id),
    // Set on events brought in from a monitoring company's file, so the same file twice adds nothing.
    sourceKey: text('source_key'),
  },
  (t) => [
    uniqueIndex('events_source_key_idx').on(t.sourceKey).where(sql`source_key is not null`),
    index('events_detector_idx').on(t.detectorId, t.occurredAt),
    index('events_site_idx').on(t.siteId, t.occurredAt),
    index('events_kind_idx').on(t.kind, t.occurredAt),
    // How long each detector has been in trouble, for the digest, without reading its other events.
    index('events_trouble_idx').on(t.detectorId, t.occurredAt).where(sql`kind = 'trouble'`),
    // The time order with its tie-break, and the detector and site each event belongs to: a text filter's
    // walk in time order tests every entry against the matches without reading the events themselves
    // (the last reachable page of a broad word went from ~300 ms to ~40 ms at stress scale).
    index('events_time_idx').on(t.occurredAt, t.id, t.detectorId, t.siteId),
  ],
)

export const attachments = sqliteTable(
  'attachments',
  {
    id: id(),
    detectorId: integer('detector_id').references(() => detectors.id),
    visitId: integer('visit_id').references(() => visits.id),
    fileName: text('file_name').notNull(),
    contentType: text('content_type').notNull(),
    sizeBytes: integer('size_bytes').notNull(),
    storageKey: text('storage_key').notNull().unique(),
    // A small JPEG made from an image upload; null for documents.
    thumbKey: text('thumb_key'),
    uploadedBy: integer('uploaded_by').references(() => users.id),
    uploadedAt: createdAt(),
  },
  (t) => [index('attachments_detector_idx').on(t.detectorId), index('attachments_visit_idx').on(t.visitId)],
)

export const sessions = sqliteTable(
  'sessions',
  {
    id: text('id').primaryKey(),
    userId: integer('user_id')
      .notNull()
      .references(() => users.id),
    createdAt: createdAt(),
    expiresAt: text('expires_at').notNull(),
    lastSeenAt: text('last_seen_at').notNull(),
    revokedAt: text('revoked_at'),
    userAgent: text('user_agent'),
    // The identity provider's ID token, kept only to end its session at sign-out (id_token_hint).
    idToken: text('id_token'),
  },
  (t) => [index('sessions_user_idx').on(t.userId)],
)

export const apiTokens = sqliteTable(
  'api_tokens',
  {
    id: id(),
    userId: integer('user_id')
      .notNull()
      .references(() => users.id),
    name: text('name').notNull(),
    // SHA-256 of the token text; the text itself is shown once and never stored.
    tokenHash: text('token_hash').notNull(),
    prefix: text('prefix').notNull(),
    createdAt: createdAt(),
    expiresAt: text('expires_at').notNull(),
    lastUsedAt: text('last_used_at'),
    revokedAt: text('revoked_at'),
  },
  (t) => [uniqueIndex('api_tokens_hash_idx').on(t.tokenHash), index('api_tokens_user_idx').on(t.userId)],
)

export const auditLog = sqliteTable(
  'audit_log',
  {
    id: id(),
    at: createdAt(),
    actorId: integer('actor_id').references(() => users.id),
    action: text('action').notNull(),
    entity: text('entity').notNull(),
    entityId: text('entity_id'),
    before: text('before', { mode: 'json' }),
    after: text('after', { mode: 'json' }),
  },
  (t) => [
    index('audit_entity_idx').on(t.entity, t.entityId),
    index('audit_at_idx').on(t.at),
    // The audit page's filters by person and by kind of change, walked newest first by id.
    index('audit_actor_idx').on(t.actorId, t.id),
    index('audit_action_idx').on(t.action, t.id),
  ],
)

export const emailOutbox = sqliteTable(
  'email_outbox',
  {
    id: id(),
    // What the message is: 'digest', 'notice' (work is about to start) or 'all-clear'.
    kind: text('kind').notNull().default('notice'),
    // Recorded before sending and passed to the provider as its idempotency key: one digest per
    // recipient per ISO week, one notice per visit and kind, however many processes try.
    idempotencyKey: text('idempotency_key'),
    recipientUserId: integer('recipient_user_id').references(() => users.id),
    visitId: integer('visit_id').references(() => visits.id),
    toAddress: text('to_address').notNull(),
    subject: text('subject').notNull(),
    html: text('html').notNull(),
    text: text('text').notNull(),
    status: text('status', { enum: OUTBOX_STATUSES })
      .notNull()
      .default('queued'),
    attempts: integer('attempts').notNull().default(0),
    // When a queued or failed-for-now message may be tried again (after a 429 or 5xx, or a crash).
    nextAttemptAt: text('next_attempt_at'),
    providerId: text('provider_id'),
    error: text('error'),
    createdAt: createdAt(),
    sentAt: text('sent_at'),
  },
  (t) => [
    index('email_outbox_status_idx').on(t.status, t.createdAt),
    uniqueIndex('email_outbox_key_idx').on(t.idempotencyKey).where(sql`idempotency_key is not null`),
  ],
)

// Each person's digest: on or off, the weekday (1 = Monday … 7 = Sunday) and hour in the office's time.
export const digestSettings = sqliteTable('digest_settings', {
  userId: integer('user_id')
    .primaryKey()
    .references(() => users.id),
  enabled: integer('enabled', { mode: 'boolean' }).notNull().default(true),
  weekday: integer('weekday').notNull().default(1),
  hour: integer('hour').notNull().default(7),
})

// Customers a person follows; none means the whole fleet.
export const digestCustomers = sqliteTable(
  'digest_customers',
  {
    userId: integer('user_id')
      .notNull()
      .references(() => users.id),
    customerId: integer('customer_id')
      .notNull()
      .references(() => customers.id),
  },
  (t) => [primaryKey({ columns: [t.userId, t.customerId] })],
)

// Row totals kept in step by triggers, so a page never recounts millions of rows.
export const tableCounts = sqliteTable('table_counts', {
  name: text('name').primaryKey(),
  rows: integer('rows').notNull().default(0),
})

// Named table views a person saved: the query string of a list page, so a view is a bookmark.
export const savedViews = sqliteTable(
  'saved_views',
  {
    id: id(),
    userId: integer('user_id')
      .notNull()
      .references(() => users.id),
    page: text('page').notNull(),
    name: text('name').notNull(),
    query: text('query').notNull(),
    createdAt: createdAt(),
  },
  (t) => [uniqueIndex('saved_views_user_page_name_idx').on(t.userId, t.page, t.name)],
)

// Small facts about the process's own work, kept across restarts: e.g. the office day for which the
// detectors' stored facts were last derived, so a restart does not derive them again.
export const appState = sqliteTable('app_state', {
  key: text('key').primaryKey(),
  value: text('value').notNull(),
  updatedAt: text('updated_at')
    .notNull()
    .default(sql`(strftime('%Y-%m-%dT%H:%M:%fZ','now'))`),
})

// Open triage-queue totals, one row per reason code plus 'open' for the whole queue, kept by triggers
// on detectors (drizzle/0007_reason_counts.sql) so Triage's counts cost a handful of row reads.
export const reasonCounts = sqliteTable('reason_counts', {
  code: text('code').primaryKey(),
  n: integer('n').notNull().default(0),
})

// The company's own calendar. Public holidays of a region are worked unless listed here as observed.
export const observedHolidays = sqliteTable(
  'observed_holidays',
  {
    region: text('region').notNull(),
    name: text('name').notNull(),
  },
  (t) => [primaryKey({ columns: [t.region, t.name] })],
)

// Days the whole company is closed (shutdowns, training days), on top of weekends and observed holidays.
export const closedDays = sqliteTable('closed_days', {
  day: text('day').primaryKey(),
  label: text('label').notNull(),
})

// One applied bulk change: what it did to each record, so it can be shown and undone. `records` holds,
// per record, the entity, id, the fields before and after and the version the change left behind;
// undo refuses a record whose version has moved on since.
export const bulkChanges = sqliteTable(
  'bulk_changes',
  {
    id: id(),
    actorId: integer('actor_id')
      .notNull()
      .references(() => users.id),
    action: text('action').notNull(),
    summary: text('summary').notNull(),
    recordCount: integer('record_count').notNull(),
    records: text('records', { mode: 'json' }).notNull(),
    at: createdAt(),
    undoneAt: text('undone_at'),
    undoneBy: integer('undone_by').references(() => users.id),
  },
  (t) => [index('bulk_changes_actor_idx').on(t.actorId, t.at)],
)

// How a source's CSV columns map to fields, remembered per source so the next file maps itself.
export const importMappings = sqliteTable('import_mappings', {
  source: text('source').primaryKey(),
  kind: text('kind').notNull(),
  mapping: text('mapping', { mode: 'json' }).notNull(),
  updatedAt: text('updated_at')
    .notNull()
    .default(sql`(strftime('%Y-%m-%dT%H:%M:%fZ','now'))`),
})

// The digest's figures as sent each ISO week, so the next week's digest can show what changed.
export const digestSnapshots = sqliteTable(
  'digest_snapshots',
  {
    userId: integer('user_id')
      .notNull()
      .references(() => users.id),
    week: text('week').notNull(),
    figures: text('figures', { mode: 'json' }).notNull(),
    createdAt: createdAt(),
  },
  (t) => [primaryKey({ columns: [t.userId, t.week] })],
)
