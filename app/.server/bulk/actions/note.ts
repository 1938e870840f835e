import { z } from 'zod'
import { defineAction, type BulkChange } from '../action'
import { missing, visitLabel, visitRows } from './rows'

/** Adds the same line to the notes of every selected visit, below what is there. */
export const note = defineAction({
  name: 'note',
  title: 'Add a note',
  entity: 'visit',
  capability: 'schedule:visits',
  input: z.object({ text: z.string().trim().min(1, 'Write the note').max(500, 'Keep a note under 500 characters') }),
  preview(db, ids, i) {
    const all = visitRows(db, ids)
    // The same line twice in a row is a repeated request, not a second note.
    const repeated = all.filter((v) => v.notes?.split('\n').at(-1) === i.text)
    const rows = all.filter((v) => !repeated.includes(v))
    const changes: BulkChange[] = rows.map((v) => ({
      entity: 'visit',
      id: v.id,
      label: visitLabel(v),
      from: { notes: v.notes },
      to: { notes: v.notes ? `${v.notes}\n${i.text}` : i.text },
      version: v.version,
    }))
    const refused = [...missing(ids, all, 'Visit'), ...repeated.map((v) => ({ id: v.id, label: visitLabel(v), reason: 'Already ends with this note' }))]
    return { changes, refused, summary: `Add a note to ${changes.length} visit${changes.length === 1 ? '' : 's'}` }
  },
})
