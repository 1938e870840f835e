import { Link, useSearchParams } from 'react-router'
import { FetchError } from '~/utils/fetch-json'
import { quietButtonClass } from './ui/page-header'

interface Issue {
  path?: string
  message?: string
}

/**
 * One refused query parameter in plain words. The list routes answer 400 with zod's issues, whose
 * enum messages read `Invalid option: expected one of "a"|"b"`; a person needs the value they gave
 * and the choices there are.
 */
function plainIssue(issue: Issue, params: URLSearchParams): string {
  const key = (issue.path ?? '').split('.')[0]
  const message = issue.message ?? ''
  const given = key ? params.getAll(key).join(', ') : ''
  const choices = /expected one of (.+)$/.exec(message)?.[1]
  if (key && choices) return `“${given}” is not a ${key} this list knows. It takes one of: ${choices.replace(/"/g, '').split('|').join(', ')}.`
  if (key && /^Invalid|^Too (big|small)|^expected/i.test(message)) return `“${given}” is not a usable ${key} (${message.replace(/^Invalid input: /, '')}).`
  return message || 'The address asks for something this list cannot show.'
}

/** A failed load, said calmly where the data would be, with a way to ask again. */
export function LoadError({
  error,
  onRetry,
  what = 'this list',
  className = '',
  resetTo,
}: {
  error: Error
  onRetry?: () => void
  what?: string
  className?: string
  /** Where the view starts over when its own address was refused (a 400): the page without its query. */
  resetTo?: string
}) {
  const [params] = useSearchParams()
  // An ended session is already on its way to sign-in: nothing to retry here.
  const signedOut = error instanceof FetchError && error.status === 401
  const refused = error instanceof FetchError && error.status === 400 && resetTo !== undefined
  if (refused) {
    const issues = ((error.body ?? {}) as { issues?: Issue[] }).issues ?? []
    const lines = issues.length > 0 ? issues.map((i) => plainIssue(i, params)) : [error.message]
    return (
      <div role="alert" className={`rounded-sm border border-line bg-sunken px-3 py-2 text-sm text-ink ${className}`}>
        <p>
          <span aria-hidden="true" className="mr-1.5 font-mono text-ink-faint">
            !
          </span>
          The address of this view asks for something the list of {what} cannot show:
        </p>
        <ul className="mt-1 list-disc pl-6">
          {[...new Set(lines)].map((l) => (
            <li key={l}>{l}</li>
          ))}
        </ul>
        <Link to={resetTo} className={`${quietButtonClass} mt-2 inline-flex min-h-11 items-center md:min-h-0`}>
          Reset the view
        </Link>
      </div>
    )
  }
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
