import { useId, useState, type ChangeEvent } from 'react'
import { messageOf, signInHref } from '~/utils/fetch-json'
import { sizeInWords, UPLOAD_ACCEPT, UPLOAD_LIMITS } from '~/utils/upload-limits'

/** One stored file as the upload route answers it. */
export interface UploadedAttachment {
  id: number
  visitId: number | null
  detectorId: number | null
  fileName: string
  contentType: string
  sizeBytes: number
  uploadedAt: string
  url: string
  thumbUrl: string | null
}

interface Props {
  visitId: number
  /** Files go on this detector's record as well as the visit's. */
  detectorId?: number
  /** The detector's tag, to name it in words. */
  detectorTag?: string
  onUploaded?: (attachments: UploadedAttachment[]) => void
}

type Sending = { state: 'idle' } | { state: 'sending'; loaded: number; total: number; count: number } | { state: 'failed'; message: string; signIn?: boolean }

/** Said before sending, so nobody waits on a slow link for a refusal the server would give anyway. */
function tooMuch(files: File[]): string | null {
  if (files.length > UPLOAD_LIMITS.files) return `Choose at most ${UPLOAD_LIMITS.files} files at a time (${files.length} chosen).`
  const big = files.find((f) => f.size > UPLOAD_LIMITS.fileBytes)
  if (big) return `"${big.name}" is ${sizeInWords(big.size)}; one file may be at most ${sizeInWords(UPLOAD_LIMITS.fileBytes)}.`
  const empty = files.find((f) => f.size === 0)
  if (empty) return `The file is empty: "${empty.name}".`
  const total = files.reduce((n, f) => n + f.size, 0)
  if (total > UPLOAD_LIMITS.requestBytes) return `These files come to ${sizeInWords(total)}; send at most ${sizeInWords(UPLOAD_LIMITS.requestBytes)} at a time.`
  return null
}

// XMLHttpRequest rather than fetch: only it reports upload progress in today's browsers, and on a
// site's mobile signal a 5 MB photo can take a while.
function send(url: string, form: FormData, onProgress: (loaded: number, total: number) => void): Promise<{ status: number; body: unknown }> {
  return new Promise((resolve, reject) => {
    const xhr = new XMLHttpRequest()
    xhr.open('POST', url)
    xhr.setRequestHeader('Accept', 'application/json')
    xhr.upload.onprogress = (e) => {
      if (e.lengthComputable) onProgress(e.loaded, e.total)
    }
    xhr.onload = () => {
      let body: unknown = null
      try {
        body = JSON.parse(xhr.responseText)
      } catch {
        // no JSON: the status alone speaks
      }
      resolve({ status: xhr.status, body })
    }
    xhr.onerror = () => reject(new Error('Ductkeeper could not be reached. Check the signal and try again; nothing was saved.'))
    xhr.onabort = () => reject(new Error('The upload was stopped; nothing was saved.'))
    xhr.send(form)
  })
}

const bigButton =
  'flex min-h-14 flex-1 cursor-pointer items-center justify-center gap-2 rounded-md border px-4 py-3 text-base font-semibold focus-within:outline-2 focus-within:outline-offset-2 focus-within:outline-accent'

/** Photos and documents for a visit from a phone: take a picture or pick files; shows progress and what was sent. */
export function PhotoUpload({ visitId, detectorId, detectorTag, onUploaded }: Props) {
  const [sending, setSending] = useState<Sending>({ state: 'idle' })
  const [sent, setSent] = useState<UploadedAttachment[]>([])
  const hintId = useId()
  const busy = sending.state === 'sending'

  async function upload(files: File[]) {
    const refusal = tooMuch(files)
    if (refusal) return setSending({ state: 'failed', message: refusal })
    const form = new FormData()
    if (detectorId !== undefined) form.append('detectorId', String(detectorId))
    for (const f of files) form.append('file', f, f.name)
    setSending({ state: 'sending', loaded: 0, total: files.reduce((n, f) => n + f.size, 0), count: files.length })
    try {
      const { status, body } = await send(`/api/visits/${visitId}/attachments`, form, (loaded, total) =>
        setSending({ state: 'sending', loaded, total, count: files.length }),
      )
      if (status === 401) {
        return setSending({ state: 'failed', message: 'Your session has ended; sign in again, then send the files again.', signIn: true })
      }
      if (status !== 201) return setSending({ state: 'failed', message: `Nothing was saved. ${messageOf(status, body)}` })
      const added = (body as { attachments: UploadedAttachment[] }).attachments
      setSent((list) => [...added, ...list])
      setSending({ state: 'idle' })
      onUploaded?.(added)
    } catch (error) {
      setSending({ state: 'failed', message: (error as Error).message })
    }
  }

  function chosen(e: ChangeEvent<HTMLInputElement>) {
    const files = Array.from(e.target.files ?? [])
    // Cleared so that choosing the same file again (after a refusal) still fires a change.
    e.target.value = ''
    if (files.length > 0) void upload(files)
  }

  const percent = sending.state === 'sending' && sending.total > 0 ? Math.min(100, Math.round((sending.loaded / sending.total) * 100)) : 0

  return (
    <section aria-label="Photos and documents" className="flex flex-col gap-3">
      <div className="flex flex-col gap-2 sm:flex-row">
        <label className={`${bigButton} border-accent bg-accent text-accent-ink ${busy ? 'pointer-events-none opacity-60' : ''}`}>
          <span aria-hidden="true">◉</span> Take a photo
          <input
            type="file"
            accept={UPLOAD_ACCEPT}
            capture="environment"
            className="sr-only"
            disabled={busy}
            aria-describedby={hintId}
            onChange={chosen}
          />
        </label>
        <label className={`${bigButton} border-line-strong bg-panel text-ink ${busy ? 'pointer-events-none opacity-60' : ''}`}>
          <span aria-hidden="true">+</span> Choose files
          <input type="file" accept={UPLOAD_ACCEPT} multiple className="sr-only" disabled={busy} aria-describedby={hintId} onChange={chosen} />
        </label>
      </div>
      <p id={hintId} className="text-sm text-ink-soft">
        JPEG, PNG, WebP or HEIC photos and PDF documents; up to {UPLOAD_LIMITS.files} files, {sizeInWords(UPLOAD_LIMITS.fileBytes)} each,{' '}
        {sizeInWords(UPLOAD_LIMITS.requestBytes)} at a time.
        {detectorId !== undefined ? ` Filed under ${detectorTag ?? `detector ${detectorId}`} as well as this visit.` : ''}
      </p>

      {sending.state === 'sending' && (
        <div className="flex flex-col gap-1" aria-live="polite">
          <span className="text-sm text-ink">
            Sending {sending.count === 1 ? '1 file' : `${sending.count} files`}… {percent}%
          </span>
          <progress className="h-3 w-full accent-accent" max={100} value={percent} aria-label="Upload progress" />
        </div>
      )}

      {sending.state === 'failed' && (
        <div role="alert" className="rounded-md border border-late/40 bg-late-soft px-3 py-2 text-base text-ink">
          {sending.message}
          {sending.signIn && (
            <>
              {' '}
              <a className="font-semibold text-accent underline" href={signInHref(typeof window === 'undefined' ? '/' : window.location.pathname)}>
                Sign in
              </a>
            </>
          )}
        </div>
      )}

      {sent.length > 0 && (
        <div>
          <h3 className="mb-2 text-sm font-semibold text-ink">Sent from here ({sent.length})</h3>
          <ul className="grid grid-cols-3 gap-2 sm:grid-cols-4">
            {sent.map((a) => (
              <li key={a.id}>
                <a href={a.url} target="_blank" rel="noreferrer" className="block rounded-md border border-line bg-panel p-1 text-xs text-ink-soft hover:border-accent">
                  {a.thumbUrl ? (
                    <img src={a.thumbUrl} alt={a.fileName} loading="lazy" className="aspect-square w-full rounded-sm object-cover" />
                  ) : (
                    <span className="flex aspect-square w-full items-center justify-center rounded-sm bg-sunken font-mono text-sm text-ink">PDF</span>
                  )}
                  <span className="mt-1 block truncate" title={a.fileName}>
                    {a.fileName}
                  </span>
                  <span className="block text-ink-faint">{sizeInWords(a.sizeBytes)}</span>
                </a>
              </li>
            ))}
          </ul>
        </div>
      )}
    </section>
  )
}
