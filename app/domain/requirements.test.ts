import { describe, expect, it } from 'vitest'
import {
  detectorRequirements,
  IMC_RETURN_CFM,
  IMC_RISER_CFM,
  IMC_SHARED_PLENUM_CFM,
  NFPA90A_RETURN_CFM,
  NFPA90A_SUPPLY_CFM,
  RULES,
  VERIFY_WITH_AHJ,
  type CodeBasis,
  type DetectorLocation,
  type RequirementsInput,
} from './requirements'

const base = (over: Partial<RequirementsInput> = {}): RequirementsInput => ({
  codeBasis: 'imc',
  supplyCfm: 1000,
  returnCfm: 1000,
  storeysServed: 1,
  sharedPlenum: false,
  areaDetection: false,
  installed: { supply: false, return: false },
  ...over,
})

const item = (input: RequirementsInput, location: DetectorLocation) => {
  const found = detectorRequirements(input).items.find((i) => i.location === location)
  if (!found) throw new Error(`no ${location} item`)
  return found
}

describe('thresholds', () => {
  it('exports the code figures', () => {
    expect(IMC_RETURN_CFM).toBe(2000) // IMC (2012) 606.2.1
    expect(IMC_SHARED_PLENUM_CFM).toBe(2000) // IMC 606.2.2
    expect(IMC_RISER_CFM).toBe(15000) // IMC 606.2.3
    expect(NFPA90A_SUPPLY_CFM).toBe(2000) // NFPA 90A (2012) 6.4.2.1
    expect(NFPA90A_RETURN_CFM).toBe(15000) // NFPA 90A (2012) 6.4.2.1
  })
})

describe('IMC return detector', () => {
  it.each([
    [1999, false],
    [2000, false], // "greater than" is strict
    [2001, true],
  ])('return %i cfm → required %s', (returnCfm, required) => {
    // IMC (2012) 606.2.1: return air systems > 2,000 cfm
    const r = item(base({ returnCfm }), 'return')
    expect(r.required).toBe(required)
    expect(r.clause).toBe('IMC (2012) 606.2.1')
  })

  it('never asks for a supply detector', () => {
    // IMC (2012) 606.2.1 is a return-side rule
    expect(item(base({ supplyCfm: 40000, returnCfm: 40000 }), 'supply').required).toBe(false)
  })

  it('area smoke detection waives it', () => {
    // IMC (2012) 606.2.1 exception: area smoke detection tied to the fire alarm
    const r = item(base({ returnCfm: 5000, areaDetection: true }), 'return')
    expect(r.required).toBe(false)
    expect(r.clause).toBe('IMC (2012) 606.2.1 exception')
    expect(r.status).toBe('not-required')
  })

  it('smoke confined to the room of origin waives every IMC line', () => {
    // IMC 606.2 exception: system cannot spread smoke beyond the room of origin
    const result = detectorRequirements(
      base({ returnCfm: 20000, storeysServed: 3, sharedPlenum: true, combinedCfm: 30000, smokeConfinedToRoom: true }),
    )
    expect(result.items.every((i) => !i.required)).toBe(true)
    expect(result.items.find((i) => i.location === 'return')?.clause).toBe('IMC (2012) 606.2 exception')
  })
})

describe('IMC shared plenum', () => {
  it.each([
    [1999, false],
    [2000, false],
    [2001, true],
  ])('combined %i cfm → required %s', (combinedCfm, required) => {
    // IMC 606.2.2: common supply/return ducts or plenums, combined capacity > 2,000 cfm
    const r = item(base({ returnCfm: 800, supplyCfm: 800, sharedPlenum: true, combinedCfm }), 'return')
    expect(r.required).toBe(required)
    expect(r.clause).toBe('IMC (2012) 606.2.2')
  })

  it('counts the combined capacity only when the plenum is shared', () => {
    // IMC 606.2.2 applies to shared ducts or plenums only
    expect(item(base({ returnCfm: 800, combinedCfm: 9000 }), 'return').required).toBe(false)
  })

  it('is not waived by area smoke detection', () => {
    // IMC (2012) 606.2.1 exception belongs to 606.2.1; IMC 606.2.2 still applies
    const r = item(base({ returnCfm: 5000, sharedPlenum: true, combinedCfm: 12000, areaDetection: true }), 'return')
    expect(r.required).toBe(true)
    expect(r.clause).toBe('IMC (2012) 606.2.2')
  })

  it('falls back to the unit’s own airflow and says so when the combined figure is missing', () => {
    // IMC 606.2.2: combined capacity is at least this unit's
    const r = item(base({ returnCfm: 2500, supplyCfm: 2500, sharedPlenum: true, areaDetection: true }), 'return')
    expect(r.required).toBe(true)
    expect(r.reason).toMatch(/not recorded/)
  })
})

describe('IMC return risers', () => {
  it.each([
    [14999, false],
    [15000, false],
    [15001, true],
  ])('two storeys at %i cfm → per-storey required %s', (returnCfm, required) => {
    // IMC 606.2.3: return risers serving two or more stories in systems > 15,000 cfm
    const r = item(base({ returnCfm, storeysServed: 2 }), 'return-each-storey')
    expect(r.required).toBe(required)
    expect(r.clause).toBe('IMC (2012) 606.2.3')
  })

  it('has no per-storey line for a single storey', () => {
    // IMC 606.2.3: two or more stories
    const items = detectorRequirements(base({ returnCfm: 30000 })).items
    expect(items.map((i) => i.location)).toEqual(['supply', 'return'])
  })

  it('still needs the return detector at the unit as well', () => {
    // IMC (2012) 606.2.1 and IMC 606.2.3 both apply above 15,000 cfm
    const items = detectorRequirements(base({ returnCfm: 20000, storeysServed: 4 })).items
    expect(items.filter((i) => i.required).map((i) => i.location)).toEqual(['return', 'return-each-storey'])
  })

  it('counts partly fitted storeys as missing', () => {
    // IMC 606.2.3: a detector at each story
    const r = item(
      base({ returnCfm: 20000, storeysServed: 4, installed: { supply: false, return: true, perStoreyReturns: 2 } }),
      'return-each-storey',
    )
    expect(r.status).toBe('missing')
    expect(r.installed).toBe(true)
    expect(r.reason).toMatch(/2 of 4 storeys/)
  })

  it('counts a detector recorded at every storey as present, and none recorded as missing', () => {
    // IMC 606.2.3: a detector at each story, upstream of the riser connection
    const fitted = (perStoreyReturns: number | undefined) =>
      item(base({ returnCfm: 20000, storeysServed: 4, installed: { supply: false, return: true, perStoreyReturns } }), 'return-each-storey').status
    expect(fitted(4)).toBe('present')
    expect(fitted(5)).toBe('present')
    expect(fitted(undefined)).toBe('missing')
    expect(fitted(0)).toBe('missing')
  })
})

describe('NFPA 90A', () => {
  const nfpa = (over: Partial<RequirementsInput> = {}) => base({ codeBasis: 'nfpa90a', ...over })

  it.each([
    [1999, false],
    [2000, false],
    [2001, true],
  ])('supply %i cfm → required %s', (supplyCfm, required) => {
    // NFPA 90A (2012) 6.4.2.1: supply side of systems > 2,000 cfm
    const r = item(nfpa({ supplyCfm }), 'supply')
    expect(r.required).toBe(required)
    expect(r.clause).toBe('NFPA 90A (2012) 6.4.2.1')
  })

  it.each([
    [14999, false],
    [15000, false],
    [15001, true],
  ])('return %i cfm over two storeys → per-storey required %s', (returnCfm, required) => {
    // NFPA 90A (2012) 6.4.2.1: return side > 15,000 cfm serving more than one story
    expect(item(nfpa({ returnCfm, storeysServed: 2 }), 'return-each-storey').required).toBe(required)
  })

  it('asks for no return detector on a single storey, however large', () => {
    // NFPA 90A (2012) 6.4.2.1: more than one story
    const items = detectorRequirements(nfpa({ supplyCfm: 30000, returnCfm: 30000 })).items
    expect(items.filter((i) => i.required).map((i) => i.location)).toEqual(['supply'])
  })

  it('ignores a 2,001 cfm return that the IMC would catch', () => {
    // NFPA 90A (2012) 6.4.2.1 vs IMC (2012) 606.2.1
    expect(item(nfpa({ returnCfm: 2001 }), 'return').required).toBe(false)
    expect(item(base({ returnCfm: 2001 }), 'return').required).toBe(true)
  })

  it('waives return detectors with area smoke detection, not the supply one', () => {
    // NFPA 90A (2012) 6.4.2.1: return detectors waived where area smoke detection covers the space
    const input = nfpa({ supplyCfm: 20000, returnCfm: 20000, storeysServed: 3, areaDetection: true })
    expect(item(input, 'return-each-storey').required).toBe(false)
    expect(item(input, 'supply').required).toBe(true)
  })
})

describe('statuses', () => {
  it('missing, present, not-required and extra', () => {
    // NFPA 90A (2012) 6.4.2.1: supply > 2,000 cfm required; nothing else on one storey
    const missing = item(base({ codeBasis: 'nfpa90a', supplyCfm: 3000 }), 'supply')
    expect(missing.status).toBe('missing')
    const present = item(
      base({ codeBasis: 'nfpa90a', supplyCfm: 3000, installed: { supply: true, return: false } }),
      'supply',
    )
    expect(present.status).toBe('present')
    const notRequired = item(base({ codeBasis: 'nfpa90a', supplyCfm: 1500 }), 'supply')
    expect(notRequired.status).toBe('not-required')
    const extra = item(
      base({ codeBasis: 'nfpa90a', supplyCfm: 1500, installed: { supply: true, return: true } }),
      'supply',
    )
    expect(extra.status).toBe('extra')
    expect(extra.installed).toBe(true)
    expect(extra.reason).toMatch(/beyond the code minimum/)
  })

  it('marks an installed return detector under the IMC exception as extra', () => {
    // IMC (2012) 606.2.1 exception
    const r = item(base({ returnCfm: 5000, areaDetection: true, installed: { supply: false, return: true } }), 'return')
    expect(r.status).toBe('extra')
  })
})

describe('every result', () => {
  const bases = Object.keys(RULES) as CodeBasis[]
  it.each(bases)('%s always carries the AHJ line and a clause on each item', (codeBasis) => {
    for (const returnCfm of [0, 2000, 2001, 15001]) {
      for (const storeysServed of [1, 2, 5]) {
        const result = detectorRequirements(base({ codeBasis, returnCfm, supplyCfm: returnCfm, storeysServed }))
        expect(result.verifyWithAhj).toBe(VERIFY_WITH_AHJ)
        expect(result.verifyWithAhj).toMatch(/authority having jurisdiction/)
        expect(result.codeBasis).toBe(codeBasis)
        for (const i of result.items) expect(i.clause.length).toBeGreaterThan(0)
      }
    }
  })
})
