import { stringify } from 'csv-stringify/sync'

/**
 * An inventory file for one new customer: `sites` sites of `units` units with `perUnit` detectors
 * each, every column filled, as an office would export it from its own spreadsheet.
 */
export function inventoryFile(o: { customer: string; model: string; sites: number; units: number; perUnit: number }): string {
  const rows: Array<Record<string, string | number>> = []
  for (let s = 1; s <= o.sites; s++) {
    for (let u = 1; u <= o.units; u++) {
      for (let d = 1; d <= o.perUnit; d++) {
        rows.push({
          customer: o.customer,
          customerKind: 'restaurant',
          site: `${o.customer.split(' ')[0]} ${s}`,
          street: `${100 + s} Alder Way`,
          city: 'Millbrook',
          region: 'US-OR',
          postalCode: '97000',
          timeZone: 'America/Los_Angeles',
          jurisdiction: 'Millbrook',
          ahjName: 'Millbrook Fire Marshal',
          codeBasis: 'imc',
          unit: `RTU-${u}`,
          unitKind: 'rtu',
          shutdownInput: 'break-to-stop',
          supplyCfm: 4000,
          returnCfm: 3600,
          ductShape: 'rectangular',
          tag: `RTU-${u}-${d}`,
          serial: `FB${s}-${u}-${d}`,
          model: o.model,
          position: d % 2 ? 'supply' : 'return',
          housing: 'standard',
          environment: d === 5 ? 'kitchen' : 'clean',
          installedOn: '2024-03-01',
          eolOhms: 15000,
          eolPlacement: 'through-supervisory',
          alarmTerminal: 'NO',
          supervisoryTerminal: 'NC',
          conductorAwg: 18,
          conductorStranded: 'yes',
          runFeet: 120,
        })
      }
    }
  }
  return stringify(rows, { header: true })
}
