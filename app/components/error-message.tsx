import { isRouteErrorResponse } from 'react-router'
import { TAP } from './ui/tap'

/** What went wrong, in words: the heading and sentence of an error page, with one way back. */
export function ErrorMessage({ error, back }: { error: unknown; back: { to: string; label: string } }) {
  let title = 'Something went wrong'
  let detail = 'The page could not be shown. Try again; if it keeps failing, tell an administrator.'
  if (isRouteErrorResponse(error)) {
    title = error.status === 404 ? 'Not found' : error.status === 403 ? 'Not allowed' : `Error ${error.status}`
    detail = typeof error.data === 'string' && error.data ? error.data : error.statusText || detail
  } else if (import.meta.env.DEV && error instanceof Error) {
    detail = error.message
  }
  return (
    <div className="max-w-xl">
      <h1 className="text-xl font-semibold">{title}</h1>
      <p className="mt-2 text-ink-soft">{detail}</p>
      {/* A plain link, not a client navigation: the page behind it loads afresh whatever failed here. */}
      <a className={`${TAP} mt-4 text-accent underline`} href={back.to}>
        {back.label}
      </a>
    </div>
  )
}
