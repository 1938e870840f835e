import { describe, expect, it } from 'vitest'
import { closedInNormal, contactState, contactTable, defaultContactModel } from './contacts'

// Labelling convention (common practice; confirm in the device's instructions): alarm and auxiliary
// contacts marked in their normal state, the supervisory contact often in its de-energized state.
describe('contacts', () => {
  const model = defaultContactModel('de-energized')

  it('alarm and auxiliary: C–NC closed in normal, C–NO closed in alarm, back to normal unpowered', () => {
    for (const c of ['alarm', 'aux1', 'aux2'] as const) {
      expect(contactState(model, c, 'normal')).toEqual({ 'C-NO': 'open', 'C-NC': 'closed' })
      expect(contactState(model, c, 'alarm')).toEqual({ 'C-NO': 'closed', 'C-NC': 'open' })
      expect(contactState(model, c, 'trouble')).toEqual({ 'C-NO': 'open', 'C-NC': 'closed' })
      expect(contactState(model, c, 'unpowered')).toEqual({ 'C-NO': 'open', 'C-NC': 'closed' })
    }
  })

  it('supervisory labelled de-energized: "NO" reads closed while powered and healthy, opens in trouble or power off', () => {
    expect(contactState(model, 'supervisory', 'normal')).toEqual({ 'C-NO': 'closed', 'C-NC': 'open' })
    expect(contactState(model, 'supervisory', 'alarm')).toEqual({ 'C-NO': 'closed', 'C-NC': 'open' })
    expect(contactState(model, 'supervisory', 'trouble')).toEqual({ 'C-NO': 'open', 'C-NC': 'closed' })
    expect(contactState(model, 'supervisory', 'unpowered')).toEqual({ 'C-NO': 'open', 'C-NC': 'closed' })
    expect(closedInNormal(model, 'supervisory')).toBe('NO')
  })

  it('supervisory labelled in normal: the marks read as printed at rest', () => {
    const m = defaultContactModel('normal')
    expect(contactState(m, 'supervisory', 'normal')).toEqual({ 'C-NO': 'open', 'C-NC': 'closed' })
    expect(contactState(m, 'supervisory', 'trouble')).toEqual({ 'C-NO': 'closed', 'C-NC': 'open' })
    expect(closedInNormal(m, 'supervisory')).toBe('NC')
  })

  it('the table lists the contacts the model has', () => {
    expect(contactTable(defaultContactModel('de-energized', 1)).map((r) => r.contact)).toEqual(['aux1', 'alarm', 'supervisory'])
    // Every state has exactly one of C–NO / C–NC closed for every contact.
    for (const row of contactTable(model)) for (const s of Object.values(row.states)) expect([s['C-NO'], s['C-NC']].sort()).toEqual(['closed', 'open'])
  })
})
