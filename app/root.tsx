import { Links, Meta, Outlet, Scripts, ScrollRestoration } from 'react-router'
import type { Route } from './+types/root'
import './app.css'
import { ErrorMessage } from '~/components/error-message'
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
  // Outside the signed-in console (sign-in, or the console itself failing): no menu to show.
  return (
    <main className="mx-auto max-w-xl p-10">
      <ErrorMessage error={error} back={{ to: '/', label: 'Back to the overview' }} />
    </main>
  )
}
