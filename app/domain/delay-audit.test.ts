import { describe, expect, it } from 'vitest'
import { auditDelay, beyondTroubleLimit, delayLimitCaution, TROUBLE_REPORTING_SECONDS } from './delay-audit'

// The delay a site should have is agreed with its monitoring company (common practice).
describe('auditDelay', () => {
  it('agree: the recorded setting matches the policy, nothing to do', () => {
    expect(auditDelay({ delaySeconds: 0, policySeconds: 0 })).toEqual({
      agreement: 'agree',
      action: 'No action: set to report at once as agreed.',
      caution: null,
    })
    expect(auditDelay({ delaySeconds: 180, policySeconds: 180 })).toEqual({
      agreement: 'agree',
      action: 'No action: set to report after 3 min as agreed.',
      caution: null,
    })
  })

  it('disagree: says both settings and to notify the monitoring company before resetting', () => {
    const r = auditDelay({ delaySeconds: 0, policySeconds: 180 })
    expect(r.agreement).toBe('disagree')
    expect(r.action).toMatch(/^Set to report at once, policy is report after 3 min\. /)
    expect(r.action).toMatch(/Notify the monitoring company, then reset the delay switches per the device instructions and re-test\./)
    const other = auditDelay({ delaySeconds: 300, policySeconds: 0 })
    expect(other.agreement).toBe('disagree')
    expect(other.action).toMatch(/^Set to report after 5 min, policy is report at once\./)
  })

  it('unknown: nobody recorded the setting, so record it next visit', () => {
    expect(auditDelay({ delaySeconds: null, policySeconds: 120 })).toEqual({
      agreement: 'unknown',
      action: 'Record the delay switch setting at the next visit (site policy: report after 2 min).',
      caution: null,
    })
  })

  it('any difference is a disagreement, and the two settings never read the same', () => {
    const r = auditDelay({ delaySeconds: 170, policySeconds: 180 })
    expect(r.agreement).toBe('disagree')
    expect(r.action).toMatch(/^Set to report after 170 s, policy is report after 3 min\./)
    expect(auditDelay({ delaySeconds: 90, policySeconds: 120 }).action).toMatch(/^Set to report after 90 s, policy is report after 2 min\./)
  })

  it('cautions past the NFPA 72 trouble limit, even when the setting agrees with the policy', () => {
    // NFPA 72: a trouble is to be annunciated within 200 s [read, secondary]
    expect(TROUBLE_REPORTING_SECONDS).toBe(200)
    expect(beyondTroubleLimit(200)).toBe(false)
    expect(beyondTroubleLimit(201)).toBe(true)
    expect(beyondTroubleLimit(null)).toBe(false)
    expect(auditDelay({ delaySeconds: 200, policySeconds: 200 }).caution).toBeNull()
    const agreed = auditDelay({ delaySeconds: 300, policySeconds: 300 })
    expect(agreed.agreement).toBe('agree')
    expect(agreed.caution).toBe(
      'The agreed policy and the module’s setting are longer than the 200 s NFPA 72 allows for a trouble to be annunciated. Keep it only as agreed with the monitoring company, and verify with the AHJ.',
    )
    expect(auditDelay({ delaySeconds: 600, policySeconds: 0 }).caution).toMatch(/^The module’s setting is longer than the 200 s .*verify with the AHJ\.$/)
    expect(auditDelay({ delaySeconds: null, policySeconds: 240 }).caution).toMatch(/^The agreed policy is longer than the 200 s .*verify with the AHJ\.$/)
    expect(delayLimitCaution({ delaySeconds: 180 })).toBeNull()
  })
})
