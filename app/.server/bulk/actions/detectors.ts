import { z } from 'zod'
import { DETECTOR_STATES } from '~/domain/vocabulary'
import { idParam } from '../../list-query'
import { BulkError, defineAction, type BulkChange, type BulkRefusal, type Fields } from '../action'
import { detectorLabel, detectorRows, missing, technicians, type DetectorRow } from './rows'

const plural = (n: number, word: string) => `${n} ${word}${n === 1 ? '' : 's'}`

/**
 * The changes for each selected detector that `decide` gives fields for; a string from `decide`
 * refuses the detector with that reason.
 */
function perDetector(db: Parameters<typeof detectorRows>[0], ids: readonly number[], decide: (d: DetectorRow) => { from: Fields; to: Fields; history?: string } | string) {
  const rows = detectorRows(db, ids)
  const refused: BulkRefusal[] = missing(ids, rows, 'Detector')
  const changes: BulkChange[] = []
  for (const d of rows) {
    const r = decide(d)
    if (typeof r === 'string') refused.push({ id: d.id, label: detectorLabel(d), reason: r })
    else changes.push({ entity: 'detector', id: d.id, label: detectorLabel(d), from: r.from, to: r.to, version: d.version, ...(r.history ? { history: r.history } : {}) })
  }
  refused.sort((a, b) => a.id - b.id)
  return { changes, refused }
}

const stateWords = (s: string) => s.replace(/-/g, ' ')

/**
 * Sets the recorded state (out of service, back to normal…); the derivation re-scores each. Each
 * detector's history gets a line saying from what to what and why, under the person's name.
 */
export const setState = defineAction({
  name: 'set-state',
  title: 'Set detector state',
  entity: 'detector',
  through: ['sites', 'customers'],
  capability: 'edit:records',
  input: z.object({
    state: z.enum(DETECTOR_STATES, { error: `State is one of ${DETECTOR_STATES.join(', ')}` }),
    reason: z.string().trim().max(300, 'Keep the reason under 300 characters').optional(),
  }),
  preview(db, ids, i) {
    const why = i.reason ? `: ${i.reason}` : ''
    const plan = perDetector(db, ids, (d) =>
      d.state === i.state
        ? `Already ${i.state}`
        : { from: { state: d.state }, to: { state: i.state }, history: `State set to ${stateWords(i.state)} (was ${stateWords(d.state)})${why}` },
    )
    return { ...plan, summary: `Set ${plural(plan.changes.length, 'detector')} to ${i.state}`, extra: { history: `State set to ${stateWords(i.state)} (was …)${why}` } }
  },
})

/** Gives detectors to a technician to follow up, or takes them back (technicianId null). */
export const assign = defineAction({
  name: 'assign',
  title: 'Assign detectors',
  entity: 'detector',
  through: ['sites', 'customers', 'events'],
  capability: 'triage:fleet',
  input: z.object({ technicianId: idParam.nullable() }),
  preview(db, ids, i) {
    let name = 'nobody'
    if (i.technicianId !== null) {
      const t = technicians(db, [i.technicianId]).get(i.technicianId)
      if (!t || t.role !== 'technician' || !t.active) throw new BulkError(400, 'Choose an active technician')
      name = t.name
    }
    const plan = perDetector(db, ids, (d) =>
      d.assignedTo === i.technicianId ? `Already with ${name}` : { from: { assignedTo: d.assignedTo }, to: { assignedTo: i.technicianId } },
    )
    return { ...plan, summary: i.technicianId === null ? `Unassign ${plural(plan.changes.length, 'detector')}` : `Assign ${plural(plan.changes.length, 'detector')} to ${name}` }
  },
})

/** Marks detectors as seen: they leave the open triage queue until something new happens. */
export const acknowledge = defineAction({
  name: 'acknowledge',
  title: 'Acknowledge',
  entity: 'detector',
  through: ['sites', 'customers', 'events'],
  capability: 'triage:fleet',
  input: z.object({}),
  preview(db, ids, _i, ctx) {
    const plan = perDetector(db, ids, (d) =>
      d.acknowledgedAt
        ? `Already acknowledged on ${d.acknowledgedAt.slice(0, 10)}`
        : { from: { acknowledgedAt: null, acknowledgedBy: d.acknowledgedBy }, to: { acknowledgedAt: ctx.now, acknowledgedBy: ctx.actor.id } },
    )
    return { ...plan, summary: `Acknowledge ${plural(plan.changes.length, 'detector')}` }
  },
})

/** Puts acknowledged detectors back in the open queue. */
export const unacknowledge = defineAction({
  name: 'unacknowledge',
  title: 'Unacknowledge',
  entity: 'detector',
  through: ['sites', 'customers'],
  capability: 'triage:fleet',
  input: z.object({}),
  preview(db, ids) {
    const plan = perDetector(db, ids, (d) =>
      d.acknowledgedAt
        ? { from: { acknowledgedAt: d.acknowledgedAt, acknowledgedBy: d.acknowledgedBy }, to: { acknowledgedAt: null, acknowledgedBy: null } }
        : 'Not acknowledged',
    )
    return { ...plan, summary: `Return ${plural(plan.changes.length, 'detector')} to the open queue` }
  },
})
