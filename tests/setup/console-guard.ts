import { format } from 'node:util'
import { afterAll, afterEach, beforeEach } from 'vitest'

// Loaded before every test file (vitest setupFiles). A console.error nobody expected is a bug being
// swallowed, so it fails the test that logged it; a test that means to provoke one says so first.

let seen: string[] = []
let allowed = false
const original = console.error
// Replaced by hand rather than with vi.spyOn, so a test's vi.restoreAllMocks() cannot undo it.
console.error = (...args: unknown[]) => {
  seen.push(format(...args))
  if (!allowed) original.apply(console, args)
}

/** Lets the current test log console.error; returns the messages it has logged, kept up to date. */
export function allowConsoleError(): readonly string[] {
  allowed = true
  return seen
}

/** Throws if console.error was called since the last check and the test did not allow it. */
export function checkConsoleErrors(where: string) {
  const calls = seen
  const wasAllowed = allowed
  seen = []
  allowed = false
  if (wasAllowed || calls.length === 0) return
  throw new Error(`Unexpected console.error ${where} (call allowConsoleError() in a test that expects one):\n${calls.join('\n')}`)
}

beforeEach(() => checkConsoleErrors('outside a test, in a hook or while collecting'))
afterEach(() => checkConsoleErrors('during this test'))
afterAll(() => checkConsoleErrors('in an afterAll hook or after the last test'))
