// The import screen's requests: the upload through XHR (fetch cannot report upload progress) and
// the check read line by line as the server streams it.

export interface Uploaded {
  id: string
  kind: 'inventory' | 'events'
  source: string
  fileName: string
  headers: string[]
  sample: string[][]
  rows: number
  mapping: Record<string, string | null>
  remembered: boolean
  fields: Array<{ key: string; label: string; always?: boolean; hint?: string }>
}

export interface Problem {
  row: number
  column: string | null
  value: string
  problem: string
}

export interface Report {
  kind: 'inventory' | 'events'
  counts: Record<string, number>
  problems: Problem[]
  problemCount: number
  notes: Problem[]
  noteCount: number
}

const messageOf = (text: string, status: number) => {
  try {
    return (JSON.parse(text) as { error?: string }).error ?? `The server answered ${status}.`
  } catch {
    return `The server answered ${status}.`
  }
}

/** Sends the file; `onProgress` hears the share sent, 0 to 1. */
export function uploadFile(form: FormData, onProgress: (share: number) => void): Promise<Uploaded> {
  return new Promise((resolve, reject) => {
    const xhr = new XMLHttpRequest()
    xhr.open('POST', '/api/import')
    xhr.upload.onprogress = (e) => e.lengthComputable && onProgress(e.loaded / e.total)
    xhr.onload = () => (xhr.status === 201 ? resolve(JSON.parse(xhr.responseText) as Uploaded) : reject(new Error(messageOf(xhr.responseText, xhr.status))))
    xhr.onerror = () => reject(new Error('The upload did not reach the server; check the connection and try again.'))
    xhr.send(form)
  })
}

async function post(id: string, body: unknown): Promise<Response> {
  const res = await fetch(`/api/import/${id}`, { method: 'POST', headers: { 'Content-Type': 'application/json' }, body: JSON.stringify(body) })
  if (!res.ok) throw new Error(messageOf(await res.text(), res.status))
  return res
}

/** Runs the check, passing on each progress line; resolves with the report. */
export async function checkFile(id: string, mapping: Uploaded['mapping'], onProgress: (rows: number) => void): Promise<Report> {
  const res = await post(id, { intent: 'check', mapping })
  const reader = res.body!.pipeThrough(new TextDecoderStream()).getReader()
  let buffer = ''
  for (;;) {
    const { done, value } = await reader.read()
    if (done) break
    buffer += value
    let end
    while ((end = buffer.indexOf('\n')) !== -1) {
      const line = JSON.parse(buffer.slice(0, end)) as { progress?: number; report?: Report; error?: string }
      buffer = buffer.slice(end + 1)
      if (line.error) throw new Error(line.error)
      if (line.report) return line.report
      if (line.progress !== undefined) onProgress(line.progress)
    }
  }
  throw new Error('The check stopped before it finished; try again.')
}

export async function commitFile(id: string, mapping: Uploaded['mapping']): Promise<Report> {
  return ((await (await post(id, { intent: 'commit', mapping })).json()) as { report: Report }).report
}

export async function discardFile(id: string): Promise<void> {
  await post(id, { intent: 'discard' })
}
