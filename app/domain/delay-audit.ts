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
  if (delaySeconds === null) {
    return {
      agreement: 'unknown',
      action: `Record the delay switch setting at the next visit (site policy: ${describe(policySeconds)}).`,
    }
  }
  if (delaySeconds === policySeconds) {
    return { agreement: 'agree', action: `No action: set to ${describe(policySeconds)} as agreed.` }
  }
  return {
    agreement: 'disagree',
    action:
      `Set to ${describe(delaySeconds)}, policy is ${describe(policySeconds)}. ` +
      'Notify the monitoring company, then reset the delay switches per the device instructions and re-test.',
  }
}
