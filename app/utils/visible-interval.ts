// A repeating refresh that runs only while the page is on screen. A hidden tab asks the server for
// nothing; when it shows again, one refresh runs at once if the last is older than the period.

export interface VisibilitySource {
  readonly visibilityState: DocumentVisibilityState
  addEventListener(type: 'visibilitychange', listener: () => void): void
  removeEventListener(type: 'visibilitychange', listener: () => void): void
}

export interface Clock {
  now: () => number
  setInterval: (fn: () => void, ms: number) => unknown
  clearInterval: (handle: unknown) => void
}

const realClock: Clock = {
  now: () => Date.now(),
  setInterval: (fn, ms) => setInterval(fn, ms),
  clearInterval: (h) => clearInterval(h as ReturnType<typeof setInterval>),
}

/** Starts the refresh; returns the function that stops it. */
export function startVisibleInterval(run: () => void, ms: number, doc: VisibilitySource, clock: Clock = realClock): () => void {
  let handle: unknown = null
  let last = clock.now()
  const tick = () => {
    last = clock.now()
    run()
  }
  const start = () => {
    if (handle === null) handle = clock.setInterval(tick, ms)
  }
  const stop = () => {
    if (handle !== null) clock.clearInterval(handle)
    handle = null
  }
  const onChange = () => {
    if (doc.visibilityState === 'visible') {
      if (clock.now() - last >= ms) tick()
      start()
    } else stop()
  }
  doc.addEventListener('visibilitychange', onChange)
  if (doc.visibilityState === 'visible') start()
  return () => {
    stop()
    doc.removeEventListener('visibilitychange', onChange)
  }
}
