export type DelayAgreement = 'agree' | 'disagree' | 'unknown'

export interface DelayAuditInput {
  /** Setting recorded or observed on the module's switches, in seconds; null if nobody recorded it. */
  delaySeconds: number | null
  /** The reporting delay agreed with the site's monitoring company, in seconds (0 = at once). */
  policySeconds: number
}

export interface DelayAuditResult {
  agreement: DelayAgreement
  action: string
  /** Set when the policy or the module's setting is past what NFPA 72 allows for a trouble; null otherwise. */
  caution: string | null
}

/**
 * NFPA 72: a trouble signal is to be annunciated within 200 s [read, secondary]. A longer module delay
 * may be a policy agreed with the monitoring company, but it is flagged, never assumed compliant.
 */
export const TROUBLE_REPORTING_SECONDS = 200

/** Whether a reporting delay (a site's policy or a module's setting) is past the NFPA 72 limit for a trouble. */
export const beyondTroubleLimit = (seconds: number | null | undefined): boolean => typeof seconds === 'number' && seconds > TROUBLE_REPORTING_SECONDS

const BEYOND = `longer than the ${TROUBLE_REPORTING_SECONDS} s NFPA 72 allows for a trouble to be annunciated`

/**
 * The one caution for a delay past the limit, worded for what carries it: the site's agreed policy,
 * a module's setting, or both. Null when neither is past it.
 */
export function delayLimitCaution(d: { policySeconds?: number | null; delaySeconds?: number | null }): string | null {
  const policy = beyondTroubleLimit(d.policySeconds)
  const setting = beyondTroubleLimit(d.delaySeconds)
  if (!policy && !setting) return null
  const what = policy && setting ? 'The agreed policy and the module’s setting are' : policy ? 'The agreed policy is' : 'The module’s setting is'
  return `${what} ${BEYOND}. Keep it only as agreed with the monitoring company, and verify with the AHJ.`
}

// Whole minutes read as minutes; anything else keeps its seconds, so two settings that differ never
// read the same (170 s and 180 s both rounded to "3 min" before).
const describe = (seconds: number) =>
  seconds === 0 ? 'report at once' : seconds % 60 === 0 ? `report after ${seconds / 60} min` : `report after ${seconds} s`

/**
 * The module's tamper/trouble reporting delay against the site's policy. The policy is agreed with
 * the monitoring company (common practice); the switch positions come from the device's instructions.
 */
export function auditDelay({ delaySeconds, policySeconds }: DelayAuditInput): DelayAuditResult {
  // Agreeing with a policy past the limit is still past the limit: the caution stands on its own.
  const caution = delayLimitCaution({ policySeconds, delaySeconds })
  if (delaySeconds === null) {
    return {
      agreement: 'unknown',
      action: `Record the delay switch setting at the next visit (site policy: ${describe(policySeconds)}).`,
      caution,
    }
  }
  if (delaySeconds === policySeconds) {
    return { agreement: 'agree', action: `No action: set to ${describe(policySeconds)} as agreed.`, caution }
  }
  return {
    agreement: 'disagree',
    action:
      `Set to ${describe(delaySeconds)}, policy is ${describe(policySeconds)}. ` +
      'Notify the monitoring company, then reset the delay switches per the device instructions and re-test.',
    caution,
  }
}
