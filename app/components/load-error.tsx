import { FetchError } from '~/utils/fetch-json'
import { quietButtonClass } from './ui/page-header'

/** A failed load, said calmly where the data would be, with a way to ask again. */
export function LoadError({ error, onRetry, what = 'this list', className = '' }: { error: Error; onRetry?: () => void; what?: string; className?: string }) {
  // An ended session is already on its way to sign-in: nothing to retry here.
  const signedOut = error instanceof FetchError && error.status === 401
  return (
    <div role="alert" className={`flex flex-wrap items-center gap-x-3 gap-y-1 rounded-sm border border-line bg-sunken px-3 py-2 text-sm text-ink ${className}`}>
      <span>
        <span aria-hidden="true" className="mr-1.5 font-mono text-ink-faint">
          !
        </span>
        {signedOut ? error.message : `Could not load ${what}: ${error.message}`}
      </span>
      {onRetry && !signedOut && (
        <button type="button" className={quietButtonClass} onClick={onRetry}>
          Try again
        </button>
      )}
    </div>
  )
}
