import { createReadableStreamFromReadable } from '@react-router/node'
import { isbot } from 'isbot'
import { PassThrough } from 'node:stream'
import type { RenderToPipeableStreamOptions } from 'react-dom/server'
import { renderToPipeableStream } from 'react-dom/server'
import type { EntryContext, HandleErrorFunction } from 'react-router'
import { isRouteErrorResponse, ServerRouter } from 'react-router'
import { startBackgroundJobs } from './.server/jobs'

export const streamTimeout = 5_000

startBackgroundJobs()

// A request for a page that is not there, or with a method a route does not take, is ordinary traffic:
// one line saying what was refused, not a stack trace that buries the real faults in the log. Anything
// else (a 5xx, a thrown Error) keeps its stack.
export const handleError: HandleErrorFunction = (error, { request }) => {
  if (request.signal.aborted) return
  // React Router keeps its own cause (no route, no action) on the response, out of its public type.
  const inner: unknown = isRouteErrorResponse(error) ? (error as { error?: unknown }).error : undefined
  if (isRouteErrorResponse(error) && error.status >= 400 && error.status < 500) {
    const why = inner instanceof Error ? inner.message : typeof error.data === 'string' ? error.data : error.statusText
    const path = new URL(request.url).pathname
    console.warn(`${request.method} ${path} ${error.status}${why ? `: ${why.replace(/\s+/g, ' ').trim()}` : ''}`)
    return
  }
  console.error(inner ?? error)
}

export default function handleRequest(request: Request, status: number, headers: Headers, routerContext: EntryContext) {
  // The console is never framed and never sniffed.
  headers.set('X-Content-Type-Options', 'nosniff')
  headers.set('Referrer-Policy', 'same-origin')
  headers.set('Content-Security-Policy', "frame-ancestors 'none'")
  if (request.method.toUpperCase() === 'HEAD') return new Response(null, { status, headers })

  return new Promise((resolve, reject) => {
    let shellRendered = false
    const userAgent = request.headers.get('user-agent')
    const readyOption: keyof RenderToPipeableStreamOptions = (userAgent && isbot(userAgent)) || routerContext.isSpaMode ? 'onAllReady' : 'onShellReady'
    let timeoutId: ReturnType<typeof setTimeout> | undefined = setTimeout(() => abort(), streamTimeout + 1000)

    const { pipe, abort } = renderToPipeableStream(<ServerRouter context={routerContext} url={request.url} />, {
      [readyOption]() {
        shellRendered = true
        const body = new PassThrough({
          final(callback) {
            clearTimeout(timeoutId)
            timeoutId = undefined
            callback()
          },
        })
        headers.set('Content-Type', 'text/html')
        pipe(body)
        resolve(new Response(createReadableStreamFromReadable(body), { headers, status }))
      },
      onShellError(error: unknown) {
        reject(error)
      },
      onError(error: unknown) {
        status = 500
        if (shellRendered) console.error(error)
      },
    })
  })
}
