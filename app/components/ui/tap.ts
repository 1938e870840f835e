// What a finger has to hit on a phone is at least 44 px tall; on a desk, with a pointer, links keep their
// ordinary size.

/** A link or control standing on its own line. */
export const TAP = 'inline-flex min-h-11 items-center sm:min-h-0'

/** A link inside a table cell or a line of text: its touch area grows past 44 px without moving the layout. */
export const TAP_AREA = '-my-3.5 inline-block py-3.5 sm:my-0 sm:py-0'
