import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest'
import { startVisibleInterval, type VisibilitySource } from './visible-interval'

// A page whose visibility the test sets, as the browser does when a tab is hidden or shown.
function fakePage(initial: DocumentVisibilityState = 'visible') {
  const listeners = new Set<() => void>()
  const page = {
    visibilityState: initial,
    addEventListener: (_: 'visibilitychange', fn: () => void) => listeners.add(fn),
    removeEventListener: (_: 'visibilitychange', fn: () => void) => listeners.delete(fn),
    set(state: DocumentVisibilityState) {
      page.visibilityState = state
      for (const fn of listeners) fn()
    },
    listeners,
  }
  return page satisfies VisibilitySource & Record<string, unknown>
}

describe('startVisibleInterval', () => {
  beforeEach(() => vi.useFakeTimers())
  afterEach(() => vi.useRealTimers())

  it('refreshes every period while visible and not at all while hidden', () => {
    const page = fakePage()
    const run = vi.fn()
    const stop = startVisibleInterval(run, 20_000, page)
    vi.advanceTimersByTime(60_000)
    expect(run).toHaveBeenCalledTimes(3)

    page.set('hidden')
    vi.advanceTimersByTime(10 * 60_000)
    expect(run).toHaveBeenCalledTimes(3)

    // Back on screen after a long absence: one refresh at once, then the period again.
    page.set('visible')
    expect(run).toHaveBeenCalledTimes(4)
    vi.advanceTimersByTime(20_000)
    expect(run).toHaveBeenCalledTimes(5)
    stop()
  })

  it('does not refresh on showing again when the last refresh is recent', () => {
    const page = fakePage()
    const run = vi.fn()
    startVisibleInterval(run, 20_000, page)
    vi.advanceTimersByTime(20_000)
    page.set('hidden')
    vi.advanceTimersByTime(5_000)
    page.set('visible')
    expect(run).toHaveBeenCalledTimes(1)
  })

  it('starts paused in a hidden tab', () => {
    const page = fakePage('hidden')
    const run = vi.fn()
    startVisibleInterval(run, 20_000, page)
    vi.advanceTimersByTime(100_000)
    expect(run).not.toHaveBeenCalled()
  })

  it('stops for good and lets go of the page', () => {
    const page = fakePage()
    const run = vi.fn()
    const stop = startVisibleInterval(run, 1_000, page)
    stop()
    vi.advanceTimersByTime(10_000)
    page.set('hidden')
    page.set('visible')
    expect(run).not.toHaveBeenCalled()
    expect(page.listeners.size).toBe(0)
  })
})
