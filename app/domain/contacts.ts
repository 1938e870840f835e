// The module's dry Form C contacts, terminal by terminal, in each detector state. The module powers
// none of them; the installer brings the voltage.
//
// Common practice (always confirm in the device's own instructions): alarm and auxiliary contacts
// are labelled in their normal state, but many modules label the supervisory contact in its
// de-energized (trouble) state. The supervisory relay is held energized while powered and healthy,
// so loss of power reads like a trouble.

export const DETECTOR_STATES = ['normal', 'alarm', 'trouble', 'unpowered'] as const
export type DetectorState = (typeof DETECTOR_STATES)[number]

export const STATE_LABELS: Record<DetectorState, string> = {
  normal: 'Normal (powered, no alarm)',
  alarm: 'Alarm',
  trouble: 'Trouble (head, cover tamper)',
  unpowered: 'Power off',
}

export type ContactName = 'aux1' | 'aux2' | 'alarm' | 'supervisory'
export type Terminal = 'NO' | 'NC'
export type Labelling = 'de-energized' | 'normal'

export const CONTACT_LABELS: Record<ContactName, string> = {
  aux1: 'Auxiliary 1',
  aux2: 'Auxiliary 2',
  alarm: 'Alarm',
  supervisory: 'Supervisory',
}

export interface ContactModel {
  /** How each contact's NO/NC marks are printed: in the de-energized state or in normal operation. */
  labelling: Record<ContactName, Labelling>
  auxContacts: 0 | 1 | 2
}

export function defaultContactModel(supervisoryLabelledIn: Labelling = 'de-energized', auxContacts: 0 | 1 | 2 = 2): ContactModel {
  return { labelling: { aux1: 'normal', aux2: 'normal', alarm: 'normal', supervisory: supervisoryLabelledIn }, auxContacts }
}

/** Whether the contact's relay coil is energized in a detector state. */
function energized(contact: ContactName, state: DetectorState): boolean {
  if (state === 'unpowered') return false
  // The supervisory relay is fail-safe: held in while all is well, dropped on trouble.
  if (contact === 'supervisory') return state !== 'trouble'
  return state === 'alarm'
}

export type ContactStates = Record<'C-NO' | 'C-NC', 'closed' | 'open'>

/** C–NO and C–NC of one contact in one state, as a meter across those terminals would show. */
export function contactState(model: ContactModel, contact: ContactName, state: DetectorState): ContactStates {
  const labelledEnergized = model.labelling[contact] === 'normal' ? energized(contact, 'normal') : false
  // "NO" is open in the labelled position; it closes when the relay sits in the other one.
  const noClosed = energized(contact, state) !== labelledEnergized
  return { 'C-NO': noClosed ? 'closed' : 'open', 'C-NC': noClosed ? 'open' : 'closed' }
}

/** The terminal of a contact that is closed in normal operation. */
export function closedInNormal(model: ContactModel, contact: ContactName): Terminal {
  return contactState(model, contact, 'normal')['C-NO'] === 'closed' ? 'NO' : 'NC'
}

export function contactsOf(model: ContactModel): ContactName[] {
  return (['aux1', 'aux2', 'alarm', 'supervisory'] as const).filter(
    (c) => (c !== 'aux1' || model.auxContacts >= 1) && (c !== 'aux2' || model.auxContacts >= 2),
  )
}

/** The whole table: every contact, every state, terminal by terminal. */
export function contactTable(model: ContactModel) {
  return contactsOf(model).map((contact) => ({
    contact,
    label: CONTACT_LABELS[contact],
    labelledIn: model.labelling[contact],
    states: Object.fromEntries(DETECTOR_STATES.map((s) => [s, contactState(model, contact, s)])) as Record<DetectorState, ContactStates>,
  }))
}
