import { isRouteErrorResponse, Links, Meta, Outlet, Scripts, ScrollRestoration } from 'react-router'
import type { Route } from './+types/root'
import './app.css'
import { apiHeaders } from '~/.server/http'
import { databaseUnavailable } from '~/.server/unavailable'

export const middleware: Route.MiddlewareFunction[] = [apiHeaders, databaseUnavailable]

export const meta: Route.MetaFunction = () => [{ title: 'Ductkeeper' }]

export function Layout({ children }: { children: React.ReactNode }) {
  return (
    <html lang="en">
      <head>
        <meta charSet="utf-8" />
        <meta name="viewport" content="width=device-width, initial-scale=1" />
        <link rel="icon" href="/favicon.svg" type="image/svg+xml" />
        <Meta />
        <Links />
      </head>
      <body>
        {children}
        <ScrollRestoration />
        <Scripts />
      </body>
    </html>
  )
}

export default function App() {
  return <Outlet />
}

export function ErrorBoundary({ error }: Route.ErrorBoundaryProps) {
  let title = 'Something went wrong'
  let detail = 'The page could not be shown. Try again; if it keeps failing, tell an administrator.'
  if (isRouteErrorResponse(error)) {
    title = error.status === 404 ? 'Not found' : error.status === 403 ? 'Not allowed' : `Error ${error.status}`
    detail = typeof error.data === 'string' && error.data ? error.data : error.statusText || detail
  } else if (import.meta.env.DEV && error instanceof Error) {
    detail = error.message
  }
  return (
    <main className="mx-auto max-w-xl p-10">
      <h1 className="text-xl font-semibold">{title}</h1>
      <p className="mt-2 text-ink-soft">{detail}</p>
      <a className="mt-6 inline-block text-accent underline" href="/">
        Back to the overview
      </a>
    </main>
  )
}
