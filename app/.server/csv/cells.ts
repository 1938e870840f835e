// Spreadsheets run a cell that starts with one of these as a formula (or, for tab and CR, may shift
// it into one), so text that begins with them is written behind a single quote.
const FORMULA_START = /^[=+\-@\t\r]/

/** Text made safe to open in a spreadsheet; numbers, dates and the rest pass unchanged. */
export function safeCell(value: string): string {
  return FORMULA_START.test(value) ? `'${value}` : value
}

/** Reverses `safeCell` on the way back in: a quote this program added before a formula start. */
export function unsafeCell(value: string): string {
  return value.length > 1 && value[0] === "'" && FORMULA_START.test(value.slice(1)) ? value.slice(1) : value
}
