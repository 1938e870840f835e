import Database from 'better-sqlite3'
import { spawn } from 'node:child_process'
import { request as httpRequest } from 'node:http'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { createDb, writeTx } from '~/.server/db'
import { MAX_BODY_BYTES } from '~/.server/http'
import { dateProblem } from '~/domain/dates'
import { DEMO_EMAIL, useSeededServer } from '#tests/setup/fixture'
import { sessionCookieFor, userIdByEmail } from '#tests/setup/sessions'
import { tempDbPath } from '#tests/setup/temp-db'

/**
 * Holds a write lock on `path` from another process for `holdMs`, as a second server or a script
 * would: better-sqlite3 is synchronous, so a holder in this thread could never let go while the
 * waiter blocks. Resolves once the lock is taken; `released` once it is let go.
 */
async function holdWriteLock(path: string, holdMs: number) {
  const code = `
    const Database = require('better-sqlite3')
    const db = new Database(process.argv[1])
    db.pragma('busy_timeout = 5000')
    db.exec('begin immediate')
    db.prepare('update lock_probe set n = n + 1').run()
    process.stdout.write('locked\\n')
    Atomics.wait(new Int32Array(new SharedArrayBuffer(4)), 0, 0, Number(process.argv[2]))
    db.exec('commit')
    process.stdout.write('released\\n')
  `
  const child = spawn(process.execPath, ['-e', code, path, String(holdMs)], { stdio: ['ignore', 'pipe', 'inherit'] })
  let out = ''
  const seen = (word: string) =>
    new Promise<void>((resolve, reject) => {
      const check = () => out.includes(word) && resolve()
      child.stdout.on('data', (d) => {
        out += d
        check()
      })
      child.once('exit', (code) => (out.includes(word) ? resolve() : reject(new Error(`lock holder exited ${code}: ${out}`))))
      check()
    })
  const released = seen('released')
  await seen('locked')
  return { released, done: new Promise((r) => child.once('exit', r)) }
}

describe('write transactions wait for the lock', () => {
  const made: Array<() => void> = []
  afterAll(() => made.forEach((c) => c()))

  function probeDb() {
    const { path, cleanup } = tempDbPath()
    const db = createDb(path)
    made.push(() => {
      db.$client.close()
      cleanup()
    })
    db.$client.exec('create table lock_probe (n integer not null); insert into lock_probe values (0)')
    return { path, db }
  }
  // Read, then write on the strength of what was read: the shape of every audited change.
  const readThenWrite = (q: Database.Database) => {
    const { n } = q.prepare('select n from lock_probe').get() as { n: number }
    q.prepare('update lock_probe set n = ?').run(n + 10)
  }

  it('writeTx waits for another connection’s write and then succeeds, losing no update', async () => {
    const { path, db } = probeDb()
    const holder = await holdWriteLock(path, 400)
    const started = performance.now()
    writeTx(db, () => readThenWrite(db.$client))
    const waited = performance.now() - started
    await holder.done
    console.info(`writeTx waited ${waited.toFixed(0)} ms for a lock held 400 ms`)
    expect(waited).toBeGreaterThan(250)
    expect(waited).toBeLessThan(5_000)
    // The holder's +1 and this +10 both stand.
    expect(db.$client.prepare('select n from lock_probe').get()).toEqual({ n: 11 })
  })

  it('a deferred transaction that reads first fails instead (what writeTx avoids)', async () => {
    const { path, db } = probeDb()
    const holder = await holdWriteLock(path, 400)
    let failure: unknown = null
    try {
      db.$client.transaction(() => readThenWrite(db.$client))()
    } catch (error) {
      failure = error
    }
    await holder.done
    expect(String(failure)).toMatch(/database is locked|SQLITE_BUSY/)
    expect(db.$client.prepare('select n from lock_probe').get()).toEqual({ n: 1 })
  })

  it('nested writeTx calls join the outer transaction', () => {
    const { db } = probeDb()
    expect(() =>
      writeTx(db, () => {
        writeTx(db, () => readThenWrite(db.$client))
        throw new Error('undo all')
      }),
    ).toThrow('undo all')
    expect(db.$client.prepare('select n from lock_probe').get()).toEqual({ n: 0 })
  })
})

describe('dates people type', () => {
  it('names what is wrong', () => {
    expect(dateProblem('2026-06-15')).toBeNull()
    expect(dateProblem('2028-02-29')).toBeNull()
    expect(dateProblem('2026-09-31')).toBe('2026-09-31 is not a day in the calendar')
    expect(dateProblem('2026-02-29')).toBe('2026-02-29 is not a day in the calendar')
    expect(dateProblem('1989-12-31')).toBe('Use a date between 1990-01-01 and 2100-12-31')
    expect(dateProblem('2101-01-01')).toBe('Use a date between 1990-01-01 and 2100-12-31')
    expect(dateProblem('0226-01-01')).toBe('Use a date between 1990-01-01 and 2100-12-31')
    expect(dateProblem('15/06/2026')).toBe('Use YYYY-MM-DD')
  })
})

describe('the server refuses bad input with a 4xx and a message', () => {
  const running = useSeededServer('small')
  let cookie = ''
  let deviceId = 0
  beforeAll(async () => {
    cookie = (await sessionCookieFor(running.data.db, userIdByEmail(running.data.db, DEMO_EMAIL.admin))).cookie
    deviceId = (running.data.db.$client.prepare('select min(id) as id from detectors').get() as { id: number }).id
  })

  const get = (path: string, headers: Record<string, string> = { Cookie: cookie }) => fetch(running.server.url + path, { headers })
  const post = (path: string, body: BodyInit | null, headers: Record<string, string>) =>
    fetch(running.server.url + path, { method: 'POST', redirect: 'manual', headers: { Cookie: cookie, Origin: running.server.url, ...headers }, body })
  const issuesOf = async (res: Response) => ((await res.json()) as { issues?: Array<{ path: string; message: string }> }).issues ?? []

  it.each([
    ['/api/devices?nextDueFrom=2026-09-31', 'nextDueFrom', '2026-09-31 is not a day in the calendar'],
    ['/api/devices?installedTo=2101-01-01', 'installedTo', 'Use a date between 1990-01-01 and 2100-12-31'],
    ['/api/visits?from=2026-02-30', 'from', '2026-02-30 is not a day in the calendar'],
    ['/api/visits?to=1989-12-31', 'to', 'Use a date between 1990-01-01 and 2100-12-31'],
    ['/api/events?from=2026-02-30T00:00:00Z', 'from', 'Use YYYY-MM-DD or an ISO 8601 date-time'],
  ])('%s is a 400 naming the date', async (path, field, message) => {
    const res = await get(path)
    expect(res.status).toBe(400)
    expect(await issuesOf(res)).toContainEqual({ path: field, message })
  })

  it('a real date in range is still accepted', async () => {
    const res = await get('/api/visits?from=2026-02-28&to=2026-06-15&limit=5')
    expect(res.status).toBe(200)
  })

  it('a visit on a day that does not exist is a 400, not a 500', async () => {
    const res = await post('/api/triage', JSON.stringify({ intent: 'schedule', ids: [deviceId], date: '2026-02-30' }), { 'Content-Type': 'application/json' })
    expect(res.status).toBe(400)
    expect(await issuesOf(res)).toContainEqual({ path: 'date', message: '2026-02-30 is not a day in the calendar' })
  })

  it.each(['0x10', '1e2', 'true', '%2012', '12.0', '-1', '0', '012', '99999999999999999'])('record id %s is a 400', async (id) => {
    const res = await get(`/api/devices/${id}`)
    expect(res.status).toBe(400)
    expect(await issuesOf(res)).toContainEqual({ path: 'deviceId', message: 'Use a record number: plain digits, 1 or more' })
  })

  it('a plain decimal id still finds its record', async () => {
    const res = await get(`/api/devices/${deviceId}`)
    expect(res.status).toBe(200)
  })

  it.each([
    ['/api/devices?site=0x1', 'site'],
    ['/api/devices?offset=1e2', 'offset'],
    ['/api/devices?limit=%2010', 'limit'],
    ['/api/devices?limit=5.0', 'limit'],
    ['/api/units?offset=-1', 'offset'],
  ])('%s is a 400', async (path, field) => {
    const res = await get(path)
    expect(res.status).toBe(400)
    expect((await issuesOf(res)).map((i) => i.path)).toContain(field)
  })

  it('ids in a body are plain digits or JSON numbers, nothing else', async () => {
    const bad = await post('/api/triage', JSON.stringify({ intent: 'acknowledge', ids: [deviceId, '0x10', true] }), { 'Content-Type': 'application/json' })
    expect(bad.status).toBe(400)
    expect((await issuesOf(bad)).map((i) => i.path)).toEqual(['ids.1', 'ids.2'])
  })

  it.each([
    ['/api/diagnose', 'text/plain', 'JSON'],
    ['/api/diagnose', 'application/x-www-form-urlencoded', 'JSON'],
    ['/api/views', 'text/plain', 'form'],
    ['/api/triage', 'application/xml', 'form'],
  ])('POST %s as %s is a 415', async (path, type, hint) => {
    const res = await post(path, 'a=1', { 'Content-Type': type })
    expect(res.status).toBe(415)
    const { error } = (await res.json()) as { error: string }
    expect(error).toContain(`A ${type} body is not accepted here.`)
    expect(error).toContain(hint)
  })

  it('a page form posted as another type is a 415', async () => {
    const res = await post('/admin/users', 'intent=invite', { 'Content-Type': 'text/plain' })
    expect(res.status).toBe(415)
  })

  it('broken JSON is a 400 that says so; a wrong shape is a 400 with the issues', async () => {
    const broken = await post('/api/views', '{"intent": "save", ', { 'Content-Type': 'application/json' })
    expect(broken.status).toBe(400)
    expect(((await broken.json()) as { error: string }).error).toMatch(/^The body is not valid JSON/)
    const wrong = await post('/api/views', JSON.stringify({ intent: 'save', page: 'devices', name: '', query: '' }), { 'Content-Type': 'application/json; charset=utf-8' })
    expect(wrong.status).toBe(400)
    expect(await issuesOf(wrong)).toContainEqual({ path: 'name', message: 'Name the view' })
  })

  it('a body just under the limit is read (and judged on its content)', async () => {
    const body = JSON.stringify({ intent: 'save', page: 'devices', name: 'Big', query: 'x'.repeat(MAX_BODY_BYTES - 100) })
    expect(body.length).toBeLessThanOrEqual(MAX_BODY_BYTES)
    const res = await post('/api/views', body, { 'Content-Type': 'application/json' })
    expect(res.status).toBe(400)
    expect((await issuesOf(res)).map((i) => i.path)).toEqual(['query'])
  })

  /**
   * Posts a body piece by piece and stops at the first answer, so the test sees whether the server
   * answered before the body was all sent. `declared` sets Content-Length; without it the body is chunked.
   */
  function postSlowly(path: string, o: { declared?: number; stopAfter: number }) {
    const url = new URL(running.server.url + path)
    return new Promise<{ status: number; error: string; sent: number; ended: boolean }>((resolve, reject) => {
      let sent = 0
      let answered = false
      const req = httpRequest(
        {
          host: url.hostname,
          port: url.port,
          path: url.pathname,
          method: 'POST',
          agent: false,
          headers: {
            Cookie: cookie,
            Origin: running.server.url,
            'Content-Type': 'application/json',
            ...(o.declared ? { 'Content-Length': String(o.declared) } : {}),
          },
        },
        (res) => {
          answered = true
          let text = ''
          res.on('data', (d) => (text += d))
          res.on('end', () => {
            resolve({ status: res.statusCode ?? 0, error: (JSON.parse(text) as { error: string }).error, sent, ended: req.writableEnded })
            req.destroy()
          })
        },
      )
      req.on('error', (error) => {
        if (!answered) reject(error)
      })
      const piece = Buffer.alloc(64 * 1024, 0x20)
      const pump = () => {
        if (answered || req.destroyed) return
        if (sent >= o.stopAfter) return // wait for the answer with the body still open
        sent += piece.length
        if (req.write(piece)) setImmediate(pump)
        else req.once('drain', pump)
      }
      pump()
    })
  }

  it('a declared oversized body is refused with 413 before it is sent', async () => {
    const res = await postSlowly('/api/views', { declared: 5 * MAX_BODY_BYTES, stopAfter: 64 * 1024 })
    expect(res.status).toBe(413)
    expect(res.error).toBe('The request body is larger than 1 MB; send less at a time.')
    // Answered with only the first 64 KB of 5 MB sent and the request still open.
    expect(res.sent).toBe(64 * 1024)
    expect(res.ended).toBe(false)
  })

  it('a chunked body is counted as it arrives and refused once past the limit', async () => {
    // The client sends a little past the limit and then waits with the body still open: only a
    // server that counts as it reads can answer now; one waiting for the end would never answer.
    const started = performance.now()
    const res = await postSlowly('/api/views', { stopAfter: MAX_BODY_BYTES + 128 * 1024 })
    expect(res.status).toBe(413)
    expect(res.error).toBe('The request body is larger than 1 MB; send less at a time.')
    expect(res.sent).toBe(MAX_BODY_BYTES + 128 * 1024)
    expect(res.ended).toBe(false)
    console.info(`chunked upload of an endless body refused with 413 in ${(performance.now() - started).toFixed(0)} ms`)
  })

  it('the server still answers normally after refusing oversized bodies', async () => {
    expect((await get('/api/devices?limit=1')).status).toBe(200)
  })

  it('an API call with no credentials is a 401, whatever its origin headers', async () => {
    const variants: Array<Record<string, string>> = [{}, { 'Sec-Fetch-Site': 'cross-site' }, { 'Sec-Fetch-Site': 'same-origin' }]
    for (const headers of variants) {
      const res = await fetch(`${running.server.url}/api/views`, {
        method: 'POST',
        headers: { ...headers, 'Content-Type': 'application/json' },
        body: JSON.stringify({ intent: 'delete', id: 1 }),
      })
      expect(res.status, JSON.stringify(headers)).toBe(401)
      expect(res.headers.get('WWW-Authenticate')).toBe('Bearer realm="Ductkeeper"')
      expect(await res.json()).toEqual({ error: 'Sign in or send a valid API token.' })
    }
    // A signed-in cookie sent from another site is still refused, now as a 403.
    const crossSite = await fetch(`${running.server.url}/api/views`, {
      method: 'POST',
      headers: { Cookie: cookie, 'Sec-Fetch-Site': 'cross-site', 'Content-Type': 'application/json' },
      body: JSON.stringify({ intent: 'delete', id: 1 }),
    })
    expect(crossSite.status).toBe(403)
  })

  it('/healthz is 200 while the database takes writes and 503 with a reason while it cannot', async () => {
    const ok = await get('/healthz', {})
    expect(ok.status).toBe(200)
    expect(await ok.json()).toEqual({ ok: true })

    const holder = new Database(running.data.path)
    holder.exec('begin immediate')
    const started = performance.now()
    const blocked = await get('/healthz', {})
    const took = performance.now() - started
    holder.exec('rollback')
    holder.close()
    console.info(`/healthz answered 503 in ${took.toFixed(0)} ms while another writer held the lock`)
    expect(blocked.status).toBe(503)
    expect(await blocked.json()).toEqual({ ok: false, error: 'Another writer has held the database lock for over 1 s.', code: 'SQLITE_BUSY' })
    expect(took).toBeLessThan(2_500)

    expect((await get('/healthz', {})).status).toBe(200)
  })
})
