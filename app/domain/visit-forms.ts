// What a visit's actions accept, checked the same way by the page, the phone form and the API
// (`POST /api/visits/:visitId` with an `intent`). Shared by client and server.
import { z } from 'zod'
import { dateProblem } from './dates'
import { NOTIFY_METHODS, VISIT_KINDS, VISIT_TASKS } from './vocabulary'

const day = z.string().superRefine((v, ctx) => {
  const problem = dateProblem(v)
  if (problem) ctx.addIssue({ code: 'custom', message: problem })
})
const clock = z.string().regex(/^([01]\d|2[0-3]):[0-5]\d$/, 'Use a 24-hour time such as 07:30')
const instant = z.iso.datetime({ offset: true, error: 'Use an ISO 8601 date-time' })
const text = (max: number) => z.string().trim().max(max)
const required = (max: number, what: string) => z.string().trim().min(1, `${what} is required`).max(max)
const id = z.number().int().positive()
/** The visit's version as last read: a save against an older one is refused (409), never merged. */
const version = z.number().int().positive()

/** The two e-mails a visit sends its monitoring company: the notice of work and the all-clear. */
const VISIT_EMAIL_KINDS = ['notice', 'all-clear'] as const

/** A number the monitoring company can ring back: digits with the usual separators, 7 to 15 digits. */
const callBack = z
  .string()
  .trim()
  .max(40)
  .regex(/^\+?[0-9 ().-]+( (ext|x)\.? ?[0-9]{1,6})?$/i, 'Give a telephone number to call back, e.g. (503) 555-0134')
  .refine((v) => {
    const digits = v.split(/ (?:ext|x)/i)[0].replace(/\D/g, '').length
    return digits >= 7 && digits <= 15
  }, 'Give a telephone number to call back, e.g. (503) 555-0134')

/** A loop reading as typed on site: ohms, or "open" for an over-range meter. */
export const ohms = z.union([z.literal('open'), z.number().min(0).max(100_000_000)])

/** Everything the technician records for one detector at a visit. */
export const detectorEntry = z.object({
  detectorId: id,
  functional: z
    .object({
      signalAtPanel: z.enum(['alarm', 'supervisory', 'nothing']),
      unitShutDown: z.boolean(),
      resetOk: z.boolean(),
      /** The detector went into alarm when tripped (its alarm LED lit). */
      detectorTripped: z.boolean().optional(),
    })
    .optional(),
  loop: z.object({ normal: ohms, alarm: ohms, trouble: ohms, unpowered: ohms }).partial().optional(),
  /**
   * Who read the meter at the panel pair: the fire alarm contractor's person and firm. Loop readings
   * need the pair isolated at the panel, which only the fire alarm contractor does; required with any reading.
   */
  loopReadBy: z.string().trim().min(2, 'Give the name and firm, at least 2 characters').max(120, 'Keep the name and firm to 120 characters').optional(),
  inputVolts: z.object({ normal: z.number().min(0).max(300), alarm: z.number().min(0).max(300) }).partial().optional(),
  pressureInWc: z.number().min(0).max(10).optional(),
  velocityFpm: z.number().min(0).max(20_000).optional(),
  sensitivityPctFt: z.number().min(0).max(20).optional(),
  delaySecondsFound: z.number().int().min(0).max(3_600).optional(),
  /** The remote test station tripped the detector (asked at each functional test where one is fitted). */
  testStationWorked: z.boolean().optional(),
  /** The station reset the detector afterwards. */
  testStationReset: z.boolean().optional(),
  cleaned: z.boolean().optional(),
  /** A module with two sensing heads: each tested and cleaned on its own. */
  heads: z
    .array(z.object({ head: z.number().int().min(1).max(2), tripped: z.boolean().optional(), cleaned: z.boolean().optional() }))
    .max(2)
    .refine((hs) => new Set(hs.map((h) => h.head)).size === hs.length, 'Enter each head once')
    .optional(),
  headsFitted: z.number().int().min(0).max(4).optional(),
  notes: text(2_000).optional(),
  result: z.enum(['pass', 'fail', 'not-tested']),
  /** Why it failed or was not tested; required for both. */
  reason: text(500).optional(),
}).superRefine((e, ctx) => {
  if (e.result !== 'pass' && !e.reason) ctx.addIssue({ code: 'custom', path: ['reason'], message: 'Say why the detector failed or was not tested' })
  if (Object.values(e.loop ?? {}).some((v) => v !== undefined) && !e.loopReadBy) {
    ctx.addIssue({ code: 'custom', path: ['loopReadBy'], message: 'Say who read the loop at the panel: the fire alarm contractor, name and firm' })
  }
})
export type DetectorEntry = z.infer<typeof detectorEntry>

export const visitIntent = z.discriminatedUnion('intent', [
  z.object({
    intent: z.literal('notify'),
    version,
    method: z.enum(NOTIFY_METHODS),
    spokeWith: required(120, 'The person spoken with'),
    confirmation: text(60).optional(),
    inTestFrom: instant,
    inTestUntil: instant,
    siteManagementTold: z.boolean(),
    siteContact: text(120).optional(),
  }),
  z.object({ intent: z.literal('start'), version }),
  z.object({ intent: z.literal('record'), version, entries: z.array(detectorEntry).min(1).max(500) }),
  z.object({
    intent: z.literal('complete'),
    version,
    entries: z.array(detectorEntry).max(500).default([]),
    /** The day the work was done, when it is written up later; the office day when absent. Never after it (checked on the server, which knows the day). */
    doneOn: day.optional(),
  }),
  z.object({ intent: z.literal('all-clear'), version, confirmedWith: required(120, 'Who confirmed the system is out of test'), at: instant.optional() }),
  // Where the monitoring company takes e-mail: the notice of work and the all-clear sent through the outbox.
  z.object({
    intent: z.literal('email-notice'),
    version,
    inTestFrom: instant,
    inTestUntil: instant,
    callBack: callBack,
    siteManagementTold: z.boolean(),
    siteContact: text(120).optional(),
  }),
  z.object({ intent: z.literal('email-all-clear'), version, callBack: callBack }),
  z.object({ intent: z.literal('retry-email'), version, kind: z.enum(VISIT_EMAIL_KINDS) }),
  z.object({ intent: z.literal('cancel'), version, reason: required(500, 'A reason') }),
  z.object({
    intent: z.literal('reschedule'),
    version,
    scheduledOn: day,
    windowFrom: clock.optional(),
    windowUntil: clock.optional(),
  }),
  z.object({ intent: z.literal('assign'), version, technicianId: id.nullable() }),
  z.object({ intent: z.literal('edit'), version, kind: z.enum(VISIT_KINDS).optional(), notes: text(2_000).optional() }),
])
export type VisitIntent = z.infer<typeof visitIntent>

/** Booking a visit from a site, a unit, a detector or a selection of detectors. */
export const newVisit = z.object({
  siteId: id,
  kind: z.enum(VISIT_KINDS),
  scheduledOn: day,
  windowFrom: clock.optional(),
  windowUntil: clock.optional(),
  technicianId: id.nullable().optional(),
  notes: text(2_000).optional(),
  detectors: z
    .array(z.object({ detectorId: id, tasks: z.array(z.enum(VISIT_TASKS)).min(1).max(VISIT_TASKS.length) }))
    .min(1, 'Choose at least one detector')
    .max(2_000),
})
export type NewVisit = z.infer<typeof newVisit>

/** One site's visit when a selection of detectors is booked from the queue: its own day and technician. */
export const siteBooking = z.object({
  siteId: id,
  scheduledOn: day,
  technicianId: z
    .number({ error: 'Choose a technician from the list, or leave the visit unassigned' })
    .int('Choose a technician from the list, or leave the visit unassigned')
    .positive('Choose a technician from the list, or leave the visit unassigned')
    .nullable(),
})
export type SiteBooking = z.infer<typeof siteBooking>
