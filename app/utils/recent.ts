// Recently opened records, kept in this browser only.
export interface RecentItem {
  href: string
  title: string
  kind: string
}

const KEY = 'ductkeeper:recent'
const MAX = 8

export function readRecent(): RecentItem[] {
  try {
    const list = JSON.parse(localStorage.getItem(KEY) ?? '[]')
    return Array.isArray(list) ? list.slice(0, MAX) : []
  } catch {
    return []
  }
}

export function addRecent(item: RecentItem) {
  try {
    const list = [item, ...readRecent().filter((r) => r.href !== item.href)].slice(0, MAX)
    localStorage.setItem(KEY, JSON.stringify(list))
  } catch {
    // Private windows may refuse storage; recents are a convenience.
  }
}
