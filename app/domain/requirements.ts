// Which duct smoke detectors a unit needs, and where, under the site's code basis. The code basis is
// a per-site setting because jurisdictions adopt different codes and editions; the answer is the
// code minimum as this module knows it, never the last word: the AHJ decides.

export type CodeBasis = 'nfpa90a' | 'imc'
export type DetectorLocation = 'supply' | 'return' | 'return-each-storey'
export type RequirementStatus = 'missing' | 'present' | 'not-required' | 'extra'

export interface RequirementsInput {
  codeBasis: CodeBasis
  /** Design airflow of the unit's supply side, cfm. */
  supplyCfm: number
  /** Design airflow of the unit's return side, cfm. */
  returnCfm: number
  /** Storeys the system serves. */
  storeysServed: number
  /** The unit shares a common supply or return duct or plenum with other units. */
  sharedPlenum: boolean
  /** Combined design capacity of all the systems sharing that duct or plenum, cfm. */
  combinedCfm?: number
  /** Every area the system serves has area smoke detection tied to the fire alarm system. */
  areaDetection: boolean
  /** The system cannot spread smoke beyond the room where it starts. */
  smokeConfinedToRoom?: boolean
  installed: {
    supply: boolean
    return: boolean
    /** Storeys that have a return detector ahead of the common return riser. */
    perStoreyReturns?: number
  }
}

export interface RequirementItem {
  location: DetectorLocation
  required: boolean
  /** The clause the decision rests on. */
  clause: string
  /** Plain words: why it is or is not required, and what that means on site. */
  reason: string
  installed: boolean
  status: RequirementStatus
}

export interface RequirementsResult {
  codeBasis: CodeBasis
  items: RequirementItem[]
  verifyWithAhj: string
}

/** What a rule set decides for one location, before the site's installed detectors are compared. */
export interface RuleDecision {
  location: DetectorLocation
  required: boolean
  clause: string
  reason: string
}

/** One code basis: the unit's facts in, one decision per location out. */
export type RuleSet = (input: RequirementsInput) => RuleDecision[]

// Thresholds. Every one is strict "greater than": a system of exactly 2,000 cfm triggers nothing.
/** IMC (2012) 606.2.1: return air systems over 2,000 cfm. */
export const IMC_RETURN_CFM = 2000
/** IMC 606.2.2: shared supply/return ducts or plenums whose combined capacity is over 2,000 cfm. */
export const IMC_SHARED_PLENUM_CFM = 2000
/** IMC 606.2.3: return risers serving two or more storeys, in systems over 15,000 cfm. */
export const IMC_RISER_CFM = 15000
/** IMC 606.2.3: "two or more stories". */
export const IMC_RISER_MIN_STOREYS = 2
/** NFPA 90A (2012) 6.4.2.1: supply side of systems over 2,000 cfm. */
export const NFPA90A_SUPPLY_CFM = 2000
/** NFPA 90A (2012) 6.4.2.1: return side of systems over 15,000 cfm serving more than one storey. */
export const NFPA90A_RETURN_CFM = 15000
/** NFPA 90A (2012) 6.4.2.1: "more than one story". */
export const NFPA90A_RETURN_MIN_STOREYS = 2

export const VERIFY_WITH_AHJ =
  'Verify with the authority having jurisdiction (AHJ): local amendments and other editions may differ.'

const cfm = (n: number) => `${Math.round(n).toLocaleString('en-US')} cfm`
// Both codes start counting at two storeys ("two or more", "more than one").
const multiStorey = (storeys: number) => storeys >= Math.min(IMC_RISER_MIN_STOREYS, NFPA90A_RETURN_MIN_STOREYS)

/**
 * IMC rules. IMC (2012) 606.2.1 return detector over 2,000 cfm, waived by area smoke detection
 * (606.2.1 exception); 606.2.2 shared plenums over 2,000 cfm combined; 606.2.3 a detector at each
 * storey on return risers of two or more storeys in systems over 15,000 cfm. The 606.2 exception
 * (smoke cannot leave the room of origin) covers all three. The area-detection exception is the
 * 606.2.1 one, so it is not applied to 606.2.2 or 606.2.3.
 */
function imcRules(input: RequirementsInput): RuleDecision[] {
  const confined = input.smokeConfinedToRoom === true
  const supply: RuleDecision = {
    location: 'supply',
    required: false,
    clause: 'IMC (2012) 606.2.1',
    reason: 'Not required: IMC 606.2 calls for detectors on the return side only.',
  }
  if (confined) {
    const reason = 'Not required: the system cannot spread smoke beyond the room where it starts (IMC 606.2 exception).'
    const decisions: RuleDecision[] = [
      supply,
      { location: 'return', required: false, clause: 'IMC (2012) 606.2 exception', reason },
    ]
    if (multiStorey(input.storeysServed)) {
      decisions.push({ location: 'return-each-storey', required: false, clause: 'IMC (2012) 606.2 exception', reason })
    }
    return decisions
  }

  // Return detector at the unit: 606.2.1 by the unit's own return airflow, or 606.2.2 by the combined
  // capacity of a shared duct or plenum. Without a combined figure, the unit's own airflow is the floor.
  const byOwnAirflow = input.returnCfm > IMC_RETURN_CFM
  const combined = input.combinedCfm ?? Math.max(input.supplyCfm, input.returnCfm)
  const byShared = input.sharedPlenum && combined > IMC_SHARED_PLENUM_CFM
  const combinedNote =
    input.sharedPlenum && input.combinedCfm === undefined
      ? ' The combined capacity of the shared duct or plenum is not recorded, so only this unit was counted: record it.'
      : ''
  let ret: RuleDecision
  if (byOwnAirflow && !input.areaDetection) {
    ret = {
      location: 'return',
      required: true,
      clause: 'IMC (2012) 606.2.1',
      reason:
        `Required: return airflow ${cfm(input.returnCfm)} is over ${cfm(IMC_RETURN_CFM)}. ` +
        'Place it in the return, upstream of filters, exhaust and outdoor-air connections.',
    }
  } else if (byShared) {
    ret = {
      location: 'return',
      required: true,
      clause: 'IMC (2012) 606.2.2',
      reason:
        `Required: the unit shares a duct or plenum whose combined capacity, ${cfm(combined)}, ` +
        `is over ${cfm(IMC_SHARED_PLENUM_CFM)}.` +
        (byOwnAirflow ? ' Area smoke detection does not waive this one.' : '') +
        combinedNote,
    }
  } else if (byOwnAirflow) {
    ret = {
      location: 'return',
      required: false,
      clause: 'IMC (2012) 606.2.1 exception',
      reason:
        `Not required: return airflow is over ${cfm(IMC_RETURN_CFM)}, but every area served has area smoke ` +
        'detection tied to the fire alarm system.',
    }
  } else {
    ret = {
      location: 'return',
      required: false,
      clause: input.sharedPlenum ? 'IMC (2012) 606.2.2' : 'IMC (2012) 606.2.1',
      reason:
        `Not required: return airflow ${cfm(input.returnCfm)} is not over ${cfm(IMC_RETURN_CFM)}` +
        (input.sharedPlenum ? `, nor is the combined capacity of the shared duct or plenum (${cfm(combined)}).` : '.') +
        combinedNote,
    }
  }

  const decisions = [supply, ret]
  if (multiStorey(input.storeysServed)) {
    const riser = input.returnCfm > IMC_RISER_CFM
    decisions.push({
      location: 'return-each-storey',
      required: riser,
      clause: 'IMC (2012) 606.2.3',
      reason: riser
        ? `Required: the return riser serves ${input.storeysServed} storeys in a system over ${cfm(IMC_RISER_CFM)}. ` +
          'Fit one at each storey, upstream of the riser connection.'
        : `Not required: the system serves ${input.storeysServed} storeys but its return airflow ` +
          `${cfm(input.returnCfm)} is not over ${cfm(IMC_RISER_CFM)}.`,
    })
  }
  return decisions
}

/**
 * NFPA 90A rules. NFPA 90A (2012) 6.4.2.1: supply side of systems over 2,000 cfm, downstream of the
 * filters and ahead of branch connections; return side of systems over 15,000 cfm serving more than
 * one storey, at each storey before the common return, waived where area smoke detection covers
 * the space. This basis has no return detector at the unit itself, and no room-of-origin exception.
 */
function nfpa90aRules(input: RequirementsInput): RuleDecision[] {
  const supplyRequired = input.supplyCfm > NFPA90A_SUPPLY_CFM
  const supply: RuleDecision = {
    location: 'supply',
    required: supplyRequired,
    clause: 'NFPA 90A (2012) 6.4.2.1',
    reason: supplyRequired
      ? `Required: supply airflow ${cfm(input.supplyCfm)} is over ${cfm(NFPA90A_SUPPLY_CFM)}. ` +
        'Place it downstream of the filters and ahead of any branch connection.'
      : `Not required: supply airflow ${cfm(input.supplyCfm)} is not over ${cfm(NFPA90A_SUPPLY_CFM)}.`,
  }
  const ret: RuleDecision = {
    location: 'return',
    required: false,
    clause: 'NFPA 90A (2012) 6.4.2.1',
    reason: multiStorey(input.storeysServed)
      ? 'Not required at the unit: NFPA 90A places return detectors at each storey (see the per-storey line).'
      : 'Not required: NFPA 90A asks for return detectors only on systems serving more than one storey.',
  }
  const decisions = [supply, ret]
  if (multiStorey(input.storeysServed)) {
    const big = input.returnCfm > NFPA90A_RETURN_CFM
    const required = big && !input.areaDetection
    decisions.push({
      location: 'return-each-storey',
      required,
      clause: 'NFPA 90A (2012) 6.4.2.1',
      reason: required
        ? `Required: return airflow ${cfm(input.returnCfm)} is over ${cfm(NFPA90A_RETURN_CFM)} and the system ` +
          `serves ${input.storeysServed} storeys. Fit one at each storey, before the common return.`
        : big
          ? `Not required: return airflow is over ${cfm(NFPA90A_RETURN_CFM)} on ${input.storeysServed} storeys, ` +
            'but area smoke detection covers the space served.'
          : `Not required: the system serves ${input.storeysServed} storeys but its return airflow ` +
            `${cfm(input.returnCfm)} is not over ${cfm(NFPA90A_RETURN_CFM)}.`,
    })
  }
  return decisions
}

/** The rule sets by code basis. A new basis is one more entry here (and in `CodeBasis`). */
export const RULES: Record<CodeBasis, RuleSet> = {
  imc: imcRules,
  nfpa90a: nfpa90aRules,
}

interface Fitted {
  /** At least one detector is recorded at this location. */
  installed: boolean
  /** Enough are recorded to meet a requirement (every storey, for per-storey returns). */
  complete: boolean
  note: string
}

function fittedAt(location: DetectorLocation, input: RequirementsInput): Fitted {
  if (location === 'supply') return { installed: input.installed.supply, complete: input.installed.supply, note: '' }
  if (location === 'return') return { installed: input.installed.return, complete: input.installed.return, note: '' }
  const fitted = Math.max(0, Math.floor(input.installed.perStoreyReturns ?? 0))
  const storeys = input.storeysServed
  const note = fitted > 0 && fitted < storeys ? ` ${fitted} of ${storeys} storeys have one.` : ''
  return { installed: fitted > 0, complete: fitted >= storeys, note }
}

function statusOf(required: boolean, fitted: Fitted): RequirementStatus {
  if (required) return fitted.complete ? 'present' : 'missing'
  return fitted.installed ? 'extra' : 'not-required'
}

// Adding a detector also means connecting it to the fire alarm system where there is one, and that
// connection is the alarm contractor's work, never the HVAC technician's.
const PLAN_IT = 'plan it with the customer and their fire alarm contractor.'

function statusNote(status: RequirementStatus, fitted: Fitted): string {
  if (status === 'missing') {
    return fitted.installed
      ? ` Not every storey has one recorded: confirm on site, then ${PLAN_IT}`
      : ` None recorded: confirm on site, then ${PLAN_IT}`
  }
  if (status === 'extra') {
    return ' Installed beyond the code minimum: that is fine; keep it on the test and cleaning schedule.'
  }
  return ''
}

/** Compares the code minimum for the unit with the detectors recorded on it. */
export function detectorRequirements(input: RequirementsInput): RequirementsResult {
  const items = RULES[input.codeBasis](input).map((d): RequirementItem => {
    const fitted = fittedAt(d.location, input)
    const status = statusOf(d.required, fitted)
    return { ...d, reason: d.reason + fitted.note + statusNote(status, fitted), installed: fitted.installed, status }
  })
  return { codeBasis: input.codeBasis, items, verifyWithAhj: VERIFY_WITH_AHJ }
}
