// What the technician has typed for a detector, kept on the phone as it is typed (one localStorage
// key per visit and detector), so a dropped connection or a closed tab loses nothing. Boxes keep the
// text as typed; `toEntry` turns a draft into what the API takes.
import { DETECTOR_STATES, type DetectorState } from '~/domain/contacts'
import { detectorEntry, type DetectorEntry } from '~/domain/visit-forms'

export interface Draft {
  signalAtPanel?: 'alarm' | 'supervisory' | 'nothing'
  detectorTripped?: boolean
  unitShutDown?: boolean
  resetOk?: boolean
  loop: Partial<Record<DetectorState, string>>
  loopOpen: Partial<Record<DetectorState, boolean>>
  /** Who read the meter at the panel: the fire alarm contractor's person and firm. */
  loopReadBy?: string
  inputNormal?: string
  inputAlarm?: string
  pressure?: string
  velocity?: string
  delay?: string
  testStationWorked?: boolean
  testStationReset?: boolean
  cleaned?: boolean
  /** Per sensing head on a two-head module, by head number. */
  perHead?: Record<string, { tripped?: boolean; cleaned?: boolean }>
  heads?: string
  notes?: string
  result?: 'pass' | 'fail' | 'not-tested'
  reason?: string
}

export const emptyDraft = (): Draft => ({ loop: {}, loopOpen: {} })

const PREFIX = 'dk:visit-draft:'
export const draftKey = (visitId: number, detectorId: number) => `${PREFIX}${visitId}:${detectorId}`

export function readDraft(visitId: number, detectorId: number): Draft | null {
  try {
    const raw = localStorage.getItem(draftKey(visitId, detectorId))
    return raw ? ({ ...emptyDraft(), ...(JSON.parse(raw) as Draft) } satisfies Draft) : null
  } catch {
    return null
  }
}

export function writeDraft(visitId: number, detectorId: number, draft: Draft) {
  try {
    localStorage.setItem(draftKey(visitId, detectorId), JSON.stringify(draft))
  } catch {
    // A full or blocked storage only loses the safety copy; the form keeps working.
  }
}

export function clearDrafts(visitId: number) {
  const mine = `${PREFIX}${visitId}:`
  for (const key of Object.keys(localStorage)) if (key.startsWith(mine)) localStorage.removeItem(key)
}

/** A number as typed, or undefined when the box is empty or not a number yet. */
export function num(s: string | undefined): number | undefined {
  if (s === undefined) return undefined
  const t = s.trim().replace(',', '.')
  if (t === '') return undefined
  const n = Number(t)
  return Number.isFinite(n) ? n : undefined
}

export function loopReadings(d: Draft): Partial<Record<DetectorState, number | 'open'>> {
  const out: Partial<Record<DetectorState, number | 'open'>> = {}
  for (const s of DETECTOR_STATES) {
    if (d.loopOpen[s]) out[s] = 'open'
    else {
      const n = num(d.loop[s])
      if (n !== undefined && n >= 0) out[s] = n
    }
  }
  return out
}

const defined = <T extends object>(o: T) => Object.fromEntries(Object.entries(o).filter(([, v]) => v !== undefined)) as T

/**
 * The draft as the API's `detectorEntry`, checked by the same schema: an error names the first problem,
 * and `field` says which box it belongs to so the form can show it there.
 */
export function toEntry(detectorId: number, d: Draft): { entry: DetectorEntry } | { error: string; field?: string } {
  const loop = loopReadings(d)
  const volts = defined({ normal: num(d.inputNormal), alarm: num(d.inputAlarm) })
  const heads = Object.entries(d.perHead ?? {})
    .map(([head, h]) => defined({ head: Number(head), tripped: h.tripped, cleaned: h.cleaned }))
    .filter((h) => h.tripped !== undefined || h.cleaned !== undefined)
    .sort((a, b) => a.head - b.head)
  // On a two-head module "cleaned" is every head cleaned; one head left is a cleaning not done.
  const headsCleaned = heads.some((h) => h.cleaned !== undefined) ? (heads.some((h) => h.cleaned === false) ? false : heads.every((h) => h.cleaned === true) ? true : undefined) : undefined
  const candidate = defined({
    detectorId,
    functional:
      d.signalAtPanel !== undefined && d.unitShutDown !== undefined && d.resetOk !== undefined
        ? defined({ signalAtPanel: d.signalAtPanel, unitShutDown: d.unitShutDown, resetOk: d.resetOk, detectorTripped: d.detectorTripped })
        : undefined,
    loop: Object.keys(loop).length ? loop : undefined,
    loopReadBy: d.loopReadBy?.trim() || undefined,
    inputVolts: Object.keys(volts).length ? volts : undefined,
    pressureInWc: num(d.pressure),
    velocityFpm: num(d.velocity),
    delaySecondsFound: num(d.delay),
    testStationWorked: d.testStationWorked,
    testStationReset: d.testStationWorked === true ? d.testStationReset : undefined,
    cleaned: headsCleaned ?? d.cleaned,
    heads: heads.length ? heads : undefined,
    headsFitted: num(d.heads),
    notes: d.notes?.trim() || undefined,
    result: d.result,
    reason: d.reason?.trim() || undefined,
  })
  if (!d.result) return { error: 'Choose a result: pass, fail or not tested.' }
  const parsed = detectorEntry.safeParse(candidate)
  if (!parsed.success) {
    const issue = parsed.error.issues[0]
    const field = issue.path.length ? String(issue.path[0]) : undefined
    return field === 'loopReadBy' ? { error: issue.message, field } : { error: `${issue.path.join(' ') || 'Entry'}: ${issue.message}`, field }
  }
  return { entry: parsed.data }
}

/** A draft that has something in it worth sending with "Complete visit". */
export const hasResult = (d: Draft | null): d is Draft => Boolean(d?.result)
