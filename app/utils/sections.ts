// The console's sections, in one list: the navigation rail, the palette and the `g` shortcuts read it.
// A section is added here only when its page exists.
export interface Section {
  to: string
  label: string
  /** Second key after `g`. */
  key: string
}

export const SECTIONS: Section[] = [{ to: '/', label: 'Overview', key: 'o' }]
