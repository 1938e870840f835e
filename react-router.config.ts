import type { Config } from '@react-router/dev/config'

export default {
  ssr: true,
  future: { v8_viteEnvironmentApi: true, v8_trailingSlashAwareDataRequests: true, v8_middleware: true },
  // The framework compares a form's Origin with the request's own URL, which behind a TLS-terminating
  // proxy is plain http on loopback, and its list of other hosts is fixed at build time. Every action
  // starts with `authorize`, whose own check (Sec-Fetch-Site, else Origin against APP_URL, read at
  // start) decides instead; so the framework's host list lets any host through to it.
  allowedActionOrigins: ['**'],
} satisfies Config
