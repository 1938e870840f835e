// The trade's words, declared once: the schema's enums, the list filters, the forms and the engine all
// read these tuples, so a state or kind added here reaches every one of them.

export const CUSTOMER_KINDS = ['restaurant', 'retail', 'office', 'school', 'healthcare'] as const

export const CODE_BASES = ['nfpa90a', 'imc'] as const

export const NOTIFY_METHODS = ['phone', 'email', 'portal'] as const

export const UNIT_KINDS = ['rtu', 'ahu', 'mau', 'erv', 'fcu'] as const

export const SHUTDOWN_INPUTS = ['break-to-stop', 'make-to-stop'] as const
export const DUCT_SHAPES = ['rectangular', 'round'] as const
export const LABELLINGS = ['de-energized', 'normal'] as const

/** The detector as the panel and the module report it. */
export const DETECTOR_STATES = ['normal', 'alarm', 'trouble', 'supervisory', 'out-of-service'] as const
export type DetectorStatus = (typeof DETECTOR_STATES)[number]

export const POSITIONS = ['supply', 'return'] as const

export const HOUSINGS = ['standard', 'nema4', 'nema4x'] as const
export type Housing = (typeof HOUSINGS)[number]

export const ENVIRONMENTS = ['clean', 'dusty', 'kitchen', 'humid'] as const
export type Environment = (typeof ENVIRONMENTS)[number]

export const EOL_PLACEMENTS = ['through-supervisory', 'across-pair'] as const
export const TERMINALS = ['NO', 'NC'] as const
export const TEST_STATIONS = ['none', 'key', 'magnet'] as const

/** Up to date; due within 30 days; past its nominal date but inside the window the standard allows; past the window. */
export const DUE_STATUSES = ['ok', 'due-soon', 'due', 'overdue'] as const
export type DueStatus = (typeof DUE_STATUSES)[number]

export const DELAY_AGREEMENTS = ['agree', 'disagree', 'unknown'] as const
export type DelayAgreement = (typeof DELAY_AGREEMENTS)[number]

export const LOOP_VERDICTS = ['pass', 'fail', 'incomplete'] as const
export type LoopVerdict = (typeof LOOP_VERDICTS)[number]

/** The periodic work a detector falls due for. */
export const TASKS = ['visual', 'functional', 'sensitivity', 'cleaning'] as const
export type Task = (typeof TASKS)[number]

/** Work a visit can cover on a detector: the periodic tasks, plus the checks done with the annual test. */
export const VISIT_TASKS = [...TASKS, 'shutdown', 'test-station'] as const
export type VisitTask = (typeof VISIT_TASKS)[number]

export const OUTCOMES = ['pass', 'fail'] as const
export type Outcome = (typeof OUTCOMES)[number]

/** An outgoing message's state: 'sending' is claimed by one process; 'failed' is final. */
export const OUTBOX_STATUSES = ['queued', 'sending', 'sent', 'failed'] as const
export type OutboxStatus = (typeof OUTBOX_STATUSES)[number]

/** What a technician's daily capacity counts. */
export const CAPACITY_UNITS = ['detectors', 'visits'] as const
export type CapacityUnit = (typeof CAPACITY_UNITS)[number]

export const VISIT_KINDS = ['inspection', 'test', 'cleaning', 'repair', 'commissioning'] as const

export const VISIT_STATUSES = ['planned', 'notified', 'in-progress', 'done', 'cancelled'] as const
export type VisitStatus = (typeof VISIT_STATUSES)[number]
/** Visits still to be worked: booked, notified or under way. */
export const OPEN_VISIT_STATUSES = ['planned', 'notified', 'in-progress'] as const satisfies readonly VisitStatus[]

export const VISIT_RESULTS = ['pending', 'pass', 'fail', 'skipped'] as const

export const READING_KINDS = [
  'loop-normal',
  'loop-alarm',
  'loop-trouble',
  'loop-unpowered',
  'input-normal',
  'input-alarm',
  'velocity',
  'pressure',
  'sensitivity',
] as const

export const EVENT_KINDS = ['alarm', 'trouble', 'supervisory', 'restore', 'test', 'reset', 'cleaning', 'notice', 'change'] as const

/** Why a detector stands in the triage queue; the engine scores each, the fleet filters on them. */
export const REASON_CODES = [
  'in-trouble',
  'in-alarm',
  'out-of-service',
  'overdue',
  'failed-test',
  'failed-diagnosis',
  'repeated-troubles',
  'humid-unrated',
  'delay-disagrees',
  'delay-unknown',
  'supervision-unproven',
] as const
export type ReasonCode = (typeof REASON_CODES)[number]
