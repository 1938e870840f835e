import { data } from 'react-router'
import { z } from 'zod'
import { idParam } from '../list-query'

/** A record route's id from its path: 400 with the issues when it is not a positive whole number. */
export function recordId(params: Record<string, string | undefined>, name: string): number {
  const parsed = z.object({ [name]: idParam }).safeParse(params)
  if (!parsed.success) {
    throw Response.json(
      { error: 'Invalid id', issues: parsed.error.issues.map((i) => ({ path: i.path.join('.'), message: i.message })) },
      { status: 400 },
    )
  }
  return parsed.data[name] as number
}

export const notFound = (what: string) => Response.json({ error: `No such ${what}.` }, { status: 404 })

/** A record page's id, read as `recordId` reads it; a page answers 404 where the API answers 400. */
export function pageRecordId(params: Record<string, string | undefined>, name: string, what: string): number {
  try {
    return recordId(params, name)
  } catch {
    throw pageNotFound(what)
  }
}

/** A page's 404 for a record that does not exist. */
export const pageNotFound = (what: string) => data(`No such ${what}.`, { status: 404 })
