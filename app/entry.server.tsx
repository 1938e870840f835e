import { createReadableStreamFromReadable } from '@react-router/node'
import { isbot } from 'isbot'
import { PassThrough } from 'node:stream'
import type { RenderToPipeableStreamOptions } from 'react-dom/server'
import { renderToPipeableStream } from 'react-dom/server'
import type { EntryContext } from 'react-router'
import { ServerRouter } from 'react-router'
import { startBackgroundJobs } from './.server/jobs'

export const streamTimeout = 5_000

startBackgroundJobs()

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
