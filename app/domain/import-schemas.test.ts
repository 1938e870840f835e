import { describe, expect, it } from 'vitest'
import type { z } from 'zod'
import { inventoryRow } from './import-schemas'
import { customerFields, detectorAddedFields, detectorFields, siteFields, unitFields } from './record-forms'

// The import column and the edit-form field that stores the same thing. Written out here, apart from
// the import's own list, so a column that drifts to a rule of its own is caught.
const SAME_FIELD: Array<[keyof typeof inventoryRow.shape, z.ZodType]> = [
  ['customer', customerFields.name],
  ['customerKind', customerFields.kind],
  ['site', siteFields.name],
  ['street', siteFields.street],
  ['city', siteFields.city],
  ['region', siteFields.region],
  ['postalCode', siteFields.postalCode],
  ['timeZone', siteFields.timeZone],
  ['jurisdiction', siteFields.jurisdiction],
  ['ahjName', siteFields.ahjName],
  ['codeBasis', siteFields.codeBasis],
  ['monitoringAccount', siteFields.monitoringAccount],
  ['unit', unitFields.tag],
  ['unitKind', unitFields.kind],
  ['shutdownInput', unitFields.shutdownInput],
  ['supplyCfm', unitFields.supplyCfm],
  ['returnCfm', unitFields.returnCfm],
  ['ductShape', unitFields.ductShape],
  ['tag', detectorFields.tag],
  ['serial', detectorFields.serial],
  ['position', detectorFields.position],
  ['housing', detectorFields.housing],
  ['environment', detectorFields.environment],
  ['installedOn', detectorAddedFields.installedOn],
  ['eolOhms', detectorFields.eolOhms],
  ['eolPlacement', detectorFields.eolPlacement],
  ['alarmTerminal', detectorFields.alarmTerminal],
  ['supervisoryTerminal', detectorFields.supervisoryTerminal],
  ['conductorAwg', detectorFields.conductorAwg],
  ['runFeet', detectorFields.runFeet],
]

// Cells a spreadsheet might hold: in and out of every range, malformed, too long.
const CELLS = [
  '0', '1', '12', '14', '17', '99', '100', '150', '2,400', '10000', '10001', '99999', '100001', '200000', '200001', '12.5', '-3', 'abc', '1e3',
  'US-OR', 'us-or', 'USA', 'America/Chicago', 'Mars/Olympus', 'UTC+2', '2024-02-28', '2024-02-30', '28/02/2024',
  'Harbour Row Kitchens', 'x'.repeat(12), 'x'.repeat(13), 'x'.repeat(40), 'x'.repeat(41), 'x'.repeat(60), 'x'.repeat(61), 'x'.repeat(120), 'x'.repeat(121), 'x'.repeat(201),
]

const optionsOf = (rule: z.ZodType) => ('options' in rule ? (rule.options as string[]) : [])

describe('an inventory row checks each cell by the edit form’s own rule', () => {
  it.each(SAME_FIELD)('%s takes exactly what the form takes, with the same value', (column, rule) => {
    for (const value of [...CELLS, ...optionsOf(rule)]) {
      const imported = inventoryRow.shape[column].safeParse(value)
      const typed = rule.safeParse(value)
      expect(imported.success, `${column} ← ${JSON.stringify(value)}`).toBe(typed.success)
      if (typed.success) expect(imported.data).toEqual(typed.data)
      else expect(imported.error?.issues[0]?.message.startsWith(typed.error.issues[0]!.message)).toBe(true)
    }
  })

  it('reads a blank cell as not given, and asks for the keys on every row', () => {
    for (const [column] of SAME_FIELD) {
      const blank = inventoryRow.shape[column].safeParse('  ')
      if (['customer', 'site', 'unit', 'tag'].includes(column)) expect(blank.success, column).toBe(false)
      else expect(blank, column).toEqual({ success: true, data: undefined })
    }
    expect(inventoryRow.shape.tag.safeParse('').error?.issues[0]?.message).toBe('The detector tag is needed on every row')
    // Columns left unmapped are simply absent from the row.
    expect(inventoryRow.parse({ customer: 'Harbour Row Kitchens', site: 'Pier 4', unit: 'RTU-1', tag: 'RTU-1-S' })).toEqual({ customer: 'Harbour Row Kitchens', site: 'Pier 4', unit: 'RTU-1', tag: 'RTU-1-S' })
  })

  it('matches a listed word without regard to case or spacing, and lists the words for one it does not know', () => {
    expect(inventoryRow.shape.ductShape.parse(' Round ')).toBe('round')
    expect(inventoryRow.shape.shutdownInput.parse('Break To Stop')).toBe('break-to-stop')
    expect(inventoryRow.shape.unitKind.safeParse('spaceship').error?.issues[0]?.message).toBe('Choose the kind of unit: one of rtu, ahu, mau, erv, fcu')
  })

  it('reads yes and no as a spreadsheet writes them, and refuses any other word rather than taking it as no', () => {
    expect(['Yes', 'stranded', '1'].map((v) => inventoryRow.shape.conductorStranded.parse(v))).toEqual([true, true, true])
    expect(['No', 'solid', '0'].map((v) => inventoryRow.shape.conductorStranded.parse(v))).toEqual([false, false, false])
    expect(inventoryRow.shape.conductorStranded.safeParse('maybe').error?.issues[0]?.message).toBe('Use yes or no')
  })
})
