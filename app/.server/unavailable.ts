import type { MiddlewareFunction } from 'react-router'
import { databaseProblem, getDb } from './db'

function unavailable(request: Request, problem: string): Response {
  const headers = { 'Cache-Control': 'no-store', 'Retry-After': '30' }
  if (new URL(request.url).pathname.startsWith('/api/')) return Response.json({ error: `Ductkeeper is unavailable. ${problem}` }, { status: 503, headers })
  const text = problem.replace(/[&<>]/g, (c) => ({ '&': '&amp;', '<': '&lt;', '>': '&gt;' })[c]!)
  return new Response(
    `<!doctype html><html lang="en"><head><meta charset="utf-8"><meta name="viewport" content="width=device-width, initial-scale=1"><title>Unavailable · Ductkeeper</title></head>` +
      `<body style="font:16px/1.5 system-ui,sans-serif;max-width:36rem;margin:3rem auto;padding:0 1rem;color:#1f2933"><main><h1>Ductkeeper is unavailable</h1><p>${text}</p><p>Tell an administrator; the page works again once the database can be written.</p></main></body></html>`,
    { status: 503, headers: { ...headers, 'Content-Type': 'text/html; charset=utf-8' } },
  )
}

/**
 * Root middleware: a database that cannot be opened or written (read-only, disk full) answers 503
 * with the reason, for pages and the API alike, instead of a 500 with a stack for every request.
 * /healthz answers for itself.
 */
export const databaseUnavailable: MiddlewareFunction<Response> = async ({ request }, next) => {
  if (new URL(request.url).pathname === '/healthz') return next()
  try {
    getDb()
  } catch (error) {
    const problem = databaseProblem(error)
    if (problem) return unavailable(request, problem)
    throw error
  }
  try {
    return await next()
  } catch (error) {
    // A resource route's error comes through here; a write refused by SQLite mid-request among them.
    const problem = databaseProblem(error)
    if (!problem) throw error
    console.error(`${request.method} ${new URL(request.url).pathname} 503: ${problem}`)
    return unavailable(request, problem)
  }
}
