import { describe as group, expect, it } from 'vitest'
import { describe, groupEntries, idsToLookUp, sentenceText, type AuditRow } from './audit-sentences'
import { formatDay } from '~/utils/format'
import { dayStartUtc, emptyNamed, type Named } from './audit-values'

const names: Named = {
  ...emptyNamed(),
  users: { 1: { name: 'Priya Castellano', email: 'lead@x.test' }, 2: { name: 'Tomas Reyna', email: 'tech@x.test' }, 3: { name: 'Ada Whitlock', email: 'admin@x.test' } },
  detectors: {
    10: { tag: 'SD-101', siteId: 5, siteName: 'Harbor Lantern Eastlake' },
    11: { tag: 'SD-102', siteId: 5, siteName: 'Harbor Lantern Eastlake' },
    12: { tag: 'SD-103', siteId: 5, siteName: 'Harbor Lantern Eastlake' },
  },
  sites: { 5: { name: 'Harbor Lantern Eastlake' } },
  visits: {
    40: { scheduledOn: '2026-06-18', kind: 'test', siteId: 5, siteName: 'Harbor Lantern Eastlake' },
    41: { scheduledOn: '2026-06-19', kind: 'inspection', siteId: 5, siteName: 'Harbor Lantern Eastlake' },
  },
  customers: { 7: { name: 'Copper Kettle Kitchens' } },
  tokens: { 9: { name: 'Nightly export', prefix: 'ab12cd34' } },
  bulk: {
    77: {
      undoneAt: null,
      records: [
        { entity: 'visit', id: 40, label: 'Visit 40 · Harbor Lantern Eastlake', before: { scheduledOn: '2026-06-18' }, after: { scheduledOn: '2026-06-25' } },
      ],
    },
  },
}
const o = { timeZone: 'America/Chicago', linkPeople: true }
let nextId = 100
const row = (r: Partial<AuditRow> & Pick<AuditRow, 'action' | 'entity'>): AuditRow => ({
  id: nextId--,
  at: '2026-06-15T14:03:00.000Z',
  actorId: 1,
  entityId: null,
  before: null,
  after: null,
  ...r,
})
const say = (rows: AuditRow[]) => sentenceText(describe(rows, names, o).parts)

group('audit sentences', () => {
  it('folds one acknowledgement of three detectors into one sentence with links', () => {
    const rows = [10, 11, 12].map((id) => row({ action: 'triage.acknowledge', entity: 'detector', entityId: String(id), after: { acknowledgedAt: '2026-06-15T14:03:00.000Z', note: null } }))
    const groups = groupEntries(rows)
    expect(groups).toHaveLength(1)
    const item = describe(groups[0], names, o)
    expect(sentenceText(item.parts)).toBe('Priya Castellano acknowledged 3 detectors at Harbor Lantern Eastlake')
    expect(item.parts).toContainEqual({ text: 'Harbor Lantern Eastlake', href: '/sites/5' })
    expect(item.records.map(sentenceText)).toEqual(['detector SD-101 at Harbor Lantern Eastlake', 'detector SD-102 at Harbor Lantern Eastlake', 'detector SD-103 at Harbor Lantern Eastlake'])
  })

  it("tells a line of several grouped entries without any one entry's details", () => {
    const at = '2026-06-15T14:00:00.000Z'
    const book = (id: string, detectors: number, technicianId: number) =>
      row({ action: 'visit.book', entity: 'visit', entityId: id, at, after: { siteId: 5, kind: 'test', technicianId, detectors: Array.from({ length: detectors }, (_, i) => ({ detectorId: 10 + i, tasks: ['visual'] })) } })
    const groups = groupEntries([book('41', 1, 2), book('40', 2, 2)])
    expect(groups).toHaveLength(1)
    expect(say(groups[0])).toBe('Priya Castellano booked 2 visits at Harbor Lantern Eastlake')
    const done = (id: string, result: string) => row({ action: 'visit.complete', entity: 'visit', entityId: id, at, after: { status: 'done', detectors: [{ detectorId: 10, result }] } })
    expect(say(groupEntries([done('41', 'fail'), done('40', 'pass')])[0])).toBe('Priya Castellano completed 2 visits at Harbor Lantern Eastlake')
  })

  it('keeps entries apart when the person, the action or the moment differs', () => {
    const a = row({ action: 'triage.acknowledge', entity: 'detector', entityId: '10' })
    const b = row({ action: 'triage.acknowledge', entity: 'detector', entityId: '11', actorId: 2 })
    const c = row({ action: 'triage.acknowledge', entity: 'detector', entityId: '12', at: '2026-06-15T15:00:00.000Z' })
    expect(groupEntries([a, b, c])).toHaveLength(3)
  })

  it.each([
    [{ action: 'user.invite', entity: 'user', entityId: '2', after: { email: 'tech@x.test', name: 'Tomas Reyna', role: 'technician' } }, 'Priya Castellano invited Tomas Reyna (tech@x.test) as Technician'],
    [{ action: 'user.change-role', entity: 'user', entityId: '2', before: { role: 'office' }, after: { role: 'technician' } }, 'Priya Castellano changed the role of Tomas Reyna from Office to Technician'],
    [{ action: 'user.deactivate', entity: 'user', entityId: '2', before: { active: true }, after: { active: false } }, 'Priya Castellano deactivated Tomas Reyna and ended their sessions and API tokens'],
    [{ action: 'user.reactivate', entity: 'user', entityId: '2' }, 'Priya Castellano reactivated Tomas Reyna'],
    [{ action: 'user.update', entity: 'user', entityId: '2', before: { regions: null, dailyCapacity: null }, after: { regions: 'US-OR,US-WA', dailyCapacity: 12 } }, 'Priya Castellano changed Tomas Reyna’s regions and daily capacity'],
    [{ action: 'token.create', entity: 'api_token', entityId: '9', after: { userId: 2, name: 'Nightly export', prefix: 'ab12cd34', expiresAt: '2026-09-13T00:00:00.000Z' } }, `Priya Castellano created API token “Nightly export” acting as Tomas Reyna, good until ${formatDay('2026-09-13')}`],
    [{ action: 'token.revoke', entity: 'api_token', entityId: '9', before: { name: 'Nightly export', prefix: 'ab12cd34', revokedAt: null }, after: { revoked: true } }, 'Priya Castellano revoked API token “Nightly export”'],
    [{ action: 'triage.assign', entity: 'detector', entityId: '10', before: { assignedTo: null }, after: { assignedTo: 2 } }, 'Priya Castellano assigned detector SD-101 at Harbor Lantern Eastlake to Tomas Reyna'],
    [{ action: 'visit.book', entity: 'visit', entityId: '40', after: { siteId: 5, kind: 'test', scheduledOn: '2026-06-18', technicianId: 2, detectors: [{ detectorId: 10, tasks: ['visual'] }, { detectorId: 11, tasks: ['visual'] }] } }, `Priya Castellano booked the test visit on ${formatDay('2026-06-18')} at Harbor Lantern Eastlake for 2 detectors with Tomas Reyna`],
    [{ action: 'visit.notify', entity: 'visit', entityId: '40', before: { status: 'planned' }, after: { status: 'notified', noticeId: 3 } }, `Priya Castellano logged the notice to the monitoring company for the test visit on ${formatDay('2026-06-18')} at Harbor Lantern Eastlake`],
    [{ action: 'visit.start', entity: 'visit', entityId: '40' }, `Priya Castellano started the test visit on ${formatDay('2026-06-18')} at Harbor Lantern Eastlake`],
    [{ action: 'visit.record', entity: 'visit', entityId: '40', after: { recorded: [{ detectorId: 10, result: 'pass' }] } }, `Priya Castellano recorded work on 1 detector for the test visit on ${formatDay('2026-06-18')} at Harbor Lantern Eastlake (1 passed)`],
    [{ action: 'visit.complete', entity: 'visit', entityId: '40', before: { status: 'in-progress' }, after: { status: 'done', detectors: [{ detectorId: 10, result: 'pass' }, { detectorId: 11, result: 'pass' }, { detectorId: 12, result: 'fail' }] } }, `Priya Castellano completed the test visit on ${formatDay('2026-06-18')} at Harbor Lantern Eastlake: 2 passed, 1 failed`],
    [{ action: 'visit.all-clear', entity: 'visit', entityId: '40', after: { clearedWith: 'Dana at Northwatch' } }, `Priya Castellano logged the all-clear for the test visit on ${formatDay('2026-06-18')} at Harbor Lantern Eastlake, confirmed with Dana at Northwatch`],
    [{ action: 'visit.cancel', entity: 'visit', entityId: '40', after: { status: 'cancelled', reason: 'Roof closed' } }, `Priya Castellano cancelled the test visit on ${formatDay('2026-06-18')} at Harbor Lantern Eastlake: “Roof closed”`],
    [{ action: 'visit.reschedule', entity: 'visit', entityId: '40', before: { scheduledOn: '2026-06-11' }, after: { scheduledOn: '2026-06-18' } }, `Priya Castellano moved the test visit on ${formatDay('2026-06-18')} at Harbor Lantern Eastlake from ${formatDay('2026-06-11')} to ${formatDay('2026-06-18')}`],
    [{ action: 'visit.assign', entity: 'visit', entityId: '40', after: { technicianId: null } }, `Priya Castellano took the technician off the test visit on ${formatDay('2026-06-18')} at Harbor Lantern Eastlake`],
    [{ action: 'visit.edit', entity: 'visit', entityId: '40', before: { kind: 'test', notes: null }, after: { kind: 'test', notes: 'Ladder needed' } }, `Priya Castellano changed the notes of the test visit on ${formatDay('2026-06-18')} at Harbor Lantern Eastlake`],
    [{ action: 'attachment.add', entity: 'attachment', entityId: '3', after: { visitId: 40, detectorId: 10, fileName: 'loop.jpg' } }, `Priya Castellano added “loop.jpg” for detector SD-101 to the test visit on ${formatDay('2026-06-18')} at Harbor Lantern Eastlake`],
    [{ action: 'view.save', entity: 'saved_view', entityId: '4', after: { page: 'devices', name: 'Kitchens overdue', query: 'due=overdue' } }, 'Priya Castellano saved the view “Kitchens overdue” on the detectors list'],
    [{ action: 'view.rename', entity: 'saved_view', entityId: '4', before: { name: 'A' }, after: { name: 'B' } }, 'Priya Castellano renamed the saved view “A” to “B”'],
    [{ action: 'view.delete', entity: 'saved_view', entityId: '4', before: { page: 'devices', name: 'Old', query: '' } }, 'Priya Castellano deleted the saved view “Old”'],
    [{ action: 'session.sign-in', entity: 'user', entityId: '1' }, 'Priya Castellano signed in'],
    [{ action: 'session.sign-out', entity: 'user', entityId: '1' }, 'Priya Castellano signed out'],
    [{ action: 'session.refused', entity: 'user', actorId: null, after: { reason: 'unknown', email: 'visitor@x.test' } }, 'Sign-in refused for visitor@x.test: not set up in Ductkeeper'],
    [{ action: 'bulk.reschedule', entity: 'visit', entityId: '77', after: { changeId: 77, summary: 'Move 1 visit by 5 working days', count: 1, records: [40] } }, 'Priya Castellano rescheduled 1 visit: “Move 1 visit by 5 working days”'],
    [{ action: 'bulk.undo', entity: 'visit', entityId: '77', before: { action: 'reschedule', summary: 'Move 1 visit by 5 working days' }, after: { changeId: 77, count: 1, records: [40] } }, 'Priya Castellano undid the bulk change “Move 1 visit by 5 working days”, putting back 1 visit'],
    [{ action: 'customer.update', entity: 'customer', entityId: '7', before: { contactPhone: '555-0100', version: 2 }, after: { contactPhone: '555-0199', version: 3 } }, 'Priya Castellano changed the contact phone of customer Copper Kettle Kitchens'],
    [{ action: 'site.update', entity: 'site', entityId: '5', before: { ahjName: 'A', name: 'X' }, after: { ahjName: 'B', name: 'Harbor Lantern Eastlake' } }, 'Priya Castellano changed the ahj name and name of site Harbor Lantern Eastlake'],
    [{ action: 'detector.update', entity: 'detector', entityId: '10', before: { delaySeconds: 10 }, after: { delaySeconds: 20 } }, 'Priya Castellano changed the delay seconds of detector SD-101 at Harbor Lantern Eastlake'],
    [{ action: 'import.inventory', entity: 'import', entityId: 'a1b2', after: { source: 'old-system', file: 'fleet.csv', rows: 16, sitesAdded: 2, sitesUpdated: 0, detectorsAdded: 14 } }, 'Priya Castellano imported inventory from “fleet.csv”: 2 sites added, 14 detectors added'],
    [{ action: 'import.events', entity: 'import', entityId: 'c3d4', after: { source: 'panel', file: 'panel.csv', rows: 1300, eventsAdded: 1204, alreadyPresent: 90 } }, 'Priya Castellano imported 1,204 events from “panel.csv” (90 events already there)'],
    [{ action: 'calendar.close', entity: 'closed_day', entityId: '2026-12-24', after: { label: 'Company holiday' } }, `Priya Castellano closed ${formatDay('2026-12-24')} on the company calendar: “Company holiday”`],
    [{ action: 'calendar.reopen', entity: 'closed_day', entityId: '2026-12-24' }, `Priya Castellano reopened ${formatDay('2026-12-24')} on the company calendar`],
    [{ action: 'bulk.set-state', entity: 'detector', entityId: '79', after: { summary: 'Out of service: 2 detectors', count: 2, records: [10, 11] } }, 'Priya Castellano changed the state of 2 detectors in one change: “Out of service: 2 detectors”'],
    [{ action: 'widget.frobnicate', entity: 'detector', entityId: '10' }, 'Priya Castellano frobnicated detector SD-101 at Harbor Lantern Eastlake'],
    [{ action: 'bulk.assign', entity: 'detector', entityId: '78', after: { summary: 'Give 3 detectors to Tomas Reyna', count: 3, records: [10, 11, 12] } }, 'Priya Castellano assigned 3 detectors in one change: “Give 3 detectors to Tomas Reyna”'],
    [{ action: 'bulk.renumber', entity: 'detector', entityId: '80', after: { summary: 'Renumber 3 detectors', count: 3, records: [10, 11, 12] } }, 'Priya Castellano renumbered 3 detectors: “Renumber 3 detectors”'],
  ] as Array<[Partial<AuditRow> & Pick<AuditRow, 'action' | 'entity'>, string]>)('%o reads as a sentence', (entry, sentence) => {
    expect(say([row(entry)])).toBe(sentence)
  })

  it('shows only the fields that changed, in words', () => {
    const item = describe(
      [row({ action: 'user.update', entity: 'user', entityId: '2', before: { regions: null, dailyCapacity: 10, capacityUnit: 'detectors' }, after: { regions: 'US-OR,US-WA', dailyCapacity: 12, capacityUnit: 'detectors' } })],
      names,
      o,
    )
    expect(item.changes).toEqual([
      { field: 'Regions', before: '—', after: 'US-OR, US-WA' },
      { field: 'Daily capacity', before: '10', after: '12' },
    ])
    const assign = describe([row({ action: 'triage.assign', entity: 'detector', entityId: '10', before: { assignedTo: null }, after: { assignedTo: 2 } })], names, o)
    expect(assign.changes).toEqual([{ field: 'Assigned to', before: '—', after: 'Tomas Reyna' }])
  })

  it('lists a bulk change record by record, with each record’s own before and after', () => {
    const item = describe([row({ action: 'bulk.reschedule', entity: 'visit', entityId: '77', after: { changeId: 77, summary: 's', count: 1, records: [40] } })], names, o)
    expect(item.changes).toEqual([])
    expect(item.records.map(sentenceText)).toEqual([`Visit 40 · Harbor Lantern Eastlake: date ${formatDay('2026-06-18')} → ${formatDay('2026-06-25')}`])
    expect(item.records[0][0]).toEqual({ text: 'Visit 40 · Harbor Lantern Eastlake', href: '/visits/40' })
  })

  it('asks for each table once, with every id the entries mention', () => {
    const want = idsToLookUp([
      row({ action: 'triage.assign', entity: 'detector', entityId: '10', after: { assignedTo: 2 } }),
      row({ action: 'bulk.reschedule', entity: 'visit', entityId: '77', after: { records: [40, 41] } }),
    ])
    expect([...want.users].sort()).toEqual([1, 2])
    expect([...want.detectors]).toEqual([10])
    expect([...want.bulk]).toEqual([77])
    expect([...want.visits].sort()).toEqual([40, 41])
  })

  it('names people without links for readers who may not open the users page', () => {
    const item = describe([row({ action: 'user.reactivate', entity: 'user', entityId: '2' })], names, { ...o, linkPeople: false })
    expect(item.parts).toEqual(['Priya Castellano reactivated Tomas Reyna'])
  })

  it('finds where the office’s day starts', () => {
    expect(dayStartUtc('2026-06-15', 'America/Chicago')).toBe('2026-06-15T05:00:00.000Z')
    expect(dayStartUtc('2026-01-15', 'America/Chicago')).toBe('2026-01-15T06:00:00.000Z')
  })
})
