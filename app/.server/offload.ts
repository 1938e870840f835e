import { setPriority } from 'node:os'
import { isMainThread, parentPort, Worker, workerData } from 'node:worker_threads'
import { runBulkJob, runUndoJob, type JobAnswer } from './bulk/jobs'
import { getDb, type Db } from './db'
import { listsChanged } from './list-query'

/**
 * Long database work (a bulk change's preview, apply and undo over thousands of records) runs in one
 * worker thread with its own connection, so the request thread keeps answering everyone else while it
 * runs: on the request thread a 10,000-visit preview held every other request for most of a second.
 * SQLite in WAL mode lets the request thread read while the worker writes; writes stay one at a time.
 *
 * The worker is this same server build loaded a second time, told by `workerData` to wait for jobs.
 * Previews are remembered where they ran, so a preview and its apply both run in the one worker.
 * Where there is no built server to load (tests importing the source, the dev server) or
 * DUCTKEEPER_OFFLOAD=off, jobs run in place, as before.
 */
const JOBS = {
  bulk: runBulkJob,
  undo: runUndoJob,
} satisfies Record<string, (db: Db, args: never) => JobAnswer>
type JobName = keyof typeof JOBS
type JobArgs<N extends JobName> = Parameters<(typeof JOBS)[N]>[1]

// Whether a job writes: the request thread's kept list totals are dropped after one that does. A
// preview writes nothing, and dropping every kept total makes each list's next request count afresh.
const WRITES: { [N in JobName]: (args: JobArgs<N>) => boolean } = {
  bulk: (args) => !args.selection.preview,
  undo: () => true,
}

const ROLE = 'ductkeeper-offload'
interface Request {
  id: number
  job: JobName
  args: unknown
}
type Reply = { id: number; answer: JobAnswer } | { id: number; error: { message: string; stack?: string } }

/** Whether this thread is the worker started to run jobs (it answers no requests, runs no timers). */
export const isOffloadWorker = !isMainThread && (workerData as { role?: string } | null)?.role === ROLE

// In the worker: answer each job in turn, on the worker's own connection.
if (isOffloadWorker) {
  // Below the request thread: on a machine with few cores a long preview takes what the requests leave.
  // On Linux a thread's nice value is its own, so this lowers the worker only.
  try {
    setPriority(10)
  } catch {
    // Not allowed here: the worker runs at the server's priority.
  }
  parentPort!.on('message', ({ id, job, args }: Request) => {
    let reply: Reply
    try {
      reply = { id, answer: JOBS[job](getDb(), args as never) }
    } catch (error) {
      reply = { id, error: error instanceof Error ? { message: error.message, stack: error.stack } : { message: String(error) } }
    }
    parentPort!.postMessage(reply)
  })
}

// A module loaded from its .ts source (tests importing it, the dev server) has no build to hand a worker.
const canOffload = () => isMainThread && import.meta.url.endsWith('.js') && process.env.DUCTKEEPER_OFFLOAD !== 'off'

let worker: Worker | null = null
let nextId = 0
const waiting = new Map<number, { resolve: (a: JobAnswer) => void; reject: (e: Error) => void }>()

function failAll(error: Error) {
  for (const w of waiting.values()) w.reject(error)
  waiting.clear()
}

function startWorker(): Worker {
  const w = new Worker(new URL(import.meta.url), { workerData: { role: ROLE } })
  w.once('online', () => console.log('Background worker ready for bulk changes'))
  w.on('message', (reply: Reply) => {
    const entry = waiting.get(reply.id)
    if (!entry) return
    waiting.delete(reply.id)
    if ('answer' in reply) entry.resolve(reply.answer)
    else entry.reject(Object.assign(new Error(reply.error.message), { stack: reply.error.stack }))
  })
  // A worker that dies takes its remembered previews with it; the next job starts a new one.
  w.on('error', (error) => {
    worker = null
    failAll(error)
  })
  w.on('exit', (code) => {
    worker = null
    failAll(new Error(`The background worker stopped (exit code ${code}).`))
  })
  // The worker never keeps the process alive by itself; the server does. After the listeners: adding
  // a 'message' listener refs the worker's port again.
  w.unref()
  return w
}

/**
 * Starts the worker ahead of the first job, so that job does not wait for the build to load; after
 * the start's own work (`jobs.ts`), so a start is not slowed by it.
 */
export function warmOffload(afterMs: number) {
  if (!canOffload()) return
  setTimeout(() => (worker ??= startWorker()), afterMs).unref()
}

/** Whether a job is running in the worker now (the write lock may be its own, held by design). */
export const offloadBusy = () => waiting.size > 0

/** Runs a job in the worker (or in place where there is none); lists' cached totals are dropped after. */
export async function runJob<N extends JobName>(job: N, args: JobArgs<N>): Promise<JobAnswer> {
  if (!canOffload()) return (JOBS[job] as (db: Db, a: JobArgs<N>) => JobAnswer)(getDb(), args)
  worker ??= startWorker()
  const id = ++nextId
  const answer = new Promise<JobAnswer>((resolve, reject) => waiting.set(id, { resolve, reject }))
  worker.postMessage({ id, job, args } satisfies Request)
  try {
    return await answer
  } finally {
    // The worker's writes are invisible to this thread's caches.
    if ((WRITES[job] as (a: JobArgs<N>) => boolean)(args)) listsChanged()
  }
}
