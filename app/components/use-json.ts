import { useCallback, useEffect, useState } from 'react'
import useSWR, { useSWRConfig, type SWRConfiguration } from 'swr'
import { FetchError, fetchJson } from '~/utils/fetch-json'
import { startVisibleInterval } from '~/utils/visible-interval'

// A refusal (4xx) will not change by asking again; a lost connection or a 5xx may.
const worthRetrying = (err: Error) => !(err instanceof FetchError) || err.status === 0 || err.status >= 500

/**
 * SWR over `fetchJson`, keyed by the API URL. With `refreshMs`, a timed refresh runs while the tab is
 * visible and is marked as background, so it never keeps an idle session alive.
 */
export function useJson<T>(url: string | null, o: { refreshMs?: number } & SWRConfiguration<T, FetchError> = {}) {
  const { refreshMs, ...config } = o
  const res = useSWR<T, FetchError>(url, (u: string) => fetchJson<T>(u), { shouldRetryOnError: worthRetrying, ...config })
  const { mutate: write } = useSWRConfig()
  // A failed background refresh, kept with its URL so that moving to another URL drops it.
  const [failed, setFailed] = useState<{ url: string; error: FetchError } | undefined>()
  const refreshError = failed && failed.url === url ? failed.error : undefined
  const setRefreshError = useCallback((error: FetchError | undefined, at: string | null = url) => setFailed(error && at ? { url: at, error } : undefined), [url])
  useEffect(() => {
    if (!url || !refreshMs) return
    return startVisibleInterval(
      () => {
        fetchJson<T>(url, { background: true }).then(
          // Written under its own URL: the hook may have moved to another key meanwhile.
          (data) => {
            setRefreshError(undefined, url)
            void write(url, data, { revalidate: false })
          },
          (e: unknown) => setRefreshError(e instanceof FetchError ? e : new FetchError(0, String(e)), url),
        )
      },
      refreshMs,
      document,
    )
  }, [url, refreshMs, write, setRefreshError])

  const { mutate } = res
  const retry = useCallback(() => {
    setRefreshError(undefined)
    return mutate()
  }, [mutate, setRefreshError])
  return { data: res.data, error: res.error ?? refreshError, isLoading: res.isLoading, mutate, retry }
}
