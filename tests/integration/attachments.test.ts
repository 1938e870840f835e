import { existsSync, readdirSync } from 'node:fs'
import { dirname, join } from 'node:path'
import sharp from 'sharp'
import { beforeAll, describe, expect, it } from 'vitest'
import { UPLOAD_LIMITS } from '~/utils/upload-limits'
import { DEMO_EMAIL, useSeededServer } from '#tests/setup/fixture'
import { sessionCookieFor, userIdByEmail } from '#tests/setup/sessions'

const running = useSeededServer('small')

interface Part {
  name: string
  bytes: Uint8Array
  type?: string
}

const PDF = new TextEncoder().encode('%PDF-1.4\n1 0 obj << /Type /Catalog >> endobj\ntrailer << /Root 1 0 R >>\n%%EOF\n')
const TEXT = new TextEncoder().encode('this is plain text, not a photo at all\n')

let folder: string
let techVisit: number
let otherVisit: number
let detectors: number[]
let jpeg: Buffer
let png: Buffer
let portraitByExif: Buffer
const cookies = {} as Record<'tech' | 'office' | 'manager', string>

beforeAll(async () => {
  const { db, path } = running.data
  folder = join(dirname(path), 'attachments')
  const techId = userIdByEmail(db, DEMO_EMAIL.technician)
  const officeId = userIdByEmail(db, DEMO_EMAIL.office)
  const site = db.$client.prepare('select site_id as siteId from detectors group by site_id having count(*) >= 3 order by site_id limit 1').get() as { siteId: number }
  detectors = (db.$client.prepare('select id from detectors where site_id = ? order by id limit 3').all(site.siteId) as Array<{ id: number }>).map((r) => r.id)
  const addVisit = (technicianId: number) => {
    const id = Number(
      db.$client
        .prepare("insert into visits (site_id, kind, scheduled_on, technician_id, status) values (?, 'inspection', '2026-06-16', ?, 'planned')")
        .run(site.siteId, technicianId).lastInsertRowid,
    )
    // The third detector stays off both visits.
    for (const d of detectors.slice(0, 2)) db.$client.prepare("insert into visit_detectors (visit_id, detector_id, tasks) values (?, ?, 'visual,functional')").run(id, d)
    return id
  }
  techVisit = addVisit(techId)
  otherVisit = addVisit(officeId)
  cookies.tech = (await sessionCookieFor(db, techId)).cookie
  cookies.office = (await sessionCookieFor(db, officeId)).cookie
  cookies.manager = (await sessionCookieFor(db, userIdByEmail(db, DEMO_EMAIL.manager))).cookie

  const raw = { width: 640, height: 480, channels: 3 as const, background: { r: 200, g: 90, b: 40 } }
  jpeg = await sharp({ create: raw }).jpeg().toBuffer()
  png = await sharp({ create: { ...raw, width: 300, height: 200 } }).png().toBuffer()
  // Stored landscape, 600 × 300, with EXIF orientation 6: upright it is portrait, 300 × 600.
  portraitByExif = await sharp({ create: { ...raw, width: 600, height: 300 } }).jpeg().withMetadata({ orientation: 6 }).toBuffer()
})

function upload(visitId: number, cookie: string, parts: Part[], fields: Record<string, string> = {}) {
  const form = new FormData()
  for (const [k, v] of Object.entries(fields)) form.append(k, v)
  for (const p of parts) form.append('file', new Blob([p.bytes as Uint8Array<ArrayBuffer>], { type: p.type ?? 'image/jpeg' }), p.name)
  return fetch(`${running.server.url}/api/visits/${visitId}/attachments`, { method: 'POST', headers: { Cookie: cookie, Origin: running.server.url }, body: form })
}

const get = (path: string, cookie = cookies.manager) => fetch(running.server.url + path, { headers: { Cookie: cookie } })

/** What is stored: the files in the folder (and any left anywhere beside it) and the rows. */
function stored() {
  const { db } = running.data
  return {
    files: existsSync(folder) ? readdirSync(folder).sort() : [],
    beside: readdirSync(dirname(folder)).filter((f) => !/^test\.db(-wal|-shm)?$/.test(f) && f !== 'attachments'),
    rows: (db.$client.prepare('select count(*) as n from attachments').get() as { n: number }).n,
    events: (db.$client.prepare("select count(*) as n from events where kind = 'change' and detail like '% added: %'").get() as { n: number }).n,
    audits: (db.$client.prepare("select count(*) as n from audit_log where action = 'attachment.add'").get() as { n: number }).n,
  }
}

interface Sent {
  id: number
  fileName: string
  contentType: string
  sizeBytes: number
  detectorId: number | null
  url: string
  thumbUrl: string | null
}

describe('uploading photos and documents to a visit', () => {
  it('takes a JPEG and a PNG from the technician, reads their types from the bytes and makes 320 px thumbnails', async () => {
    const before = stored()
    const res = await upload(techVisit, cookies.tech, [{ name: 'return duct head.jpg', bytes: jpeg, type: 'application/octet-stream' }, { name: 'label.png', bytes: png, type: 'image/jpeg' }], {
      detectorId: String(detectors[0]),
    })
    expect(res.status).toBe(201)
    const { attachments } = (await res.json()) as { attachments: Sent[] }
    expect(attachments.map((a) => [a.fileName, a.contentType, a.sizeBytes, a.detectorId])).toEqual([
      ['return duct head.jpg', 'image/jpeg', jpeg.length, detectors[0]],
      ['label.png', 'image/png', png.length, detectors[0]],
    ])
    const after = stored()
    expect(after.rows - before.rows).toBe(2)
    expect(after.events - before.events).toBe(2)
    expect(after.audits - before.audits).toBe(2)
    expect(after.files.length - before.files.length).toBe(4)
    expect(after.files.filter((f) => f.startsWith('.'))).toEqual([])
    const detail = running.data.db.$client.prepare("select detail, detector_id as d from events where detail like 'Photo added: %' order by id").all()
    expect(detail).toEqual([
      { detail: 'Photo added: return duct head.jpg', d: detectors[0] },
      { detail: 'Photo added: label.png', d: detectors[0] },
    ])

    const thumb = await get(attachments[0].thumbUrl!)
    expect(thumb.status).toBe(200)
    expect(thumb.headers.get('content-type')).toBe('image/jpeg')
    const meta = await sharp(Buffer.from(await thumb.arrayBuffer())).metadata()
    expect([meta.format, meta.width, meta.height]).toEqual(['jpeg', 320, 240])
    const pngThumb = await sharp(Buffer.from(await (await get(attachments[1].thumbUrl!)).arrayBuffer())).metadata()
    expect([pngThumb.format, pngThumb.width, pngThumb.height]).toEqual(['jpeg', 300, 200])

    const file = await get(attachments[1].url)
    expect(file.status).toBe(200)
    expect(file.headers.get('content-type')).toBe('image/png')
    expect(file.headers.get('x-content-type-options')).toBe('nosniff')
    expect(file.headers.get('cache-control')).toMatch(/^private/)
    expect(file.headers.get('content-disposition')).toBe(`inline; filename="label.png"; filename*=UTF-8''label.png`)
    expect(Buffer.from(await file.arrayBuffer()).equals(png)).toBe(true)

    const list = (await (await get(`/api/visits/${techVisit}/attachments`)).json()) as { attachments: Sent[] }
    expect(list.attachments.map((a) => a.id)).toEqual(attachments.map((a) => a.id))
  })

  it('turns the thumbnail upright by the EXIF orientation', async () => {
    const res = await upload(techVisit, cookies.tech, [{ name: 'portrait.jpg', bytes: portraitByExif }])
    expect(res.status).toBe(201)
    const [a] = ((await res.json()) as { attachments: Sent[] }).attachments
    const meta = await sharp(Buffer.from(await (await get(a.thumbUrl!)).arrayBuffer())).metadata()
    expect([meta.width, meta.height]).toEqual([160, 320])
  })

  it('takes a PDF without a thumbnail', async () => {
    const before = stored()
    const res = await upload(techVisit, cookies.tech, [{ name: 'sensitivity report.pdf', bytes: PDF, type: 'image/png' }])
    expect(res.status).toBe(201)
    const [a] = ((await res.json()) as { attachments: Sent[] }).attachments
    expect([a.contentType, a.thumbUrl, a.sizeBytes]).toEqual(['application/pdf', null, PDF.length])
    expect(stored().files.length - before.files.length).toBe(1)
    expect((await get(`/api/attachments/${a.id}/thumb`)).status).toBe(404)
    const file = await get(a.url)
    expect(file.headers.get('content-type')).toBe('application/pdf')
    expect(Buffer.from(await file.arrayBuffer()).equals(Buffer.from(PDF))).toBe(true)
    const event = running.data.db.$client.prepare('select detail from events order by id desc limit 1').get()
    expect(event).toEqual({ detail: 'Document added: sensitivity report.pdf' })
  })

  it('keeps only a safe base name from a path-like name and stores the file under its own name inside the folder', async () => {
    const before = stored()
    const res = await upload(techVisit, cookies.tech, [
      { name: '../../x.jpg', bytes: jpeg },
      { name: 'C:\\Users\\tech\\y.jpg', bytes: jpeg },
    ])
    expect(res.status).toBe(201)
    const { attachments } = (await res.json()) as { attachments: Sent[] }
    expect(attachments.map((a) => a.fileName)).toEqual(['x.jpg', 'y.jpg'])
    const after = stored()
    expect(after.beside).toEqual(before.beside)
    expect(existsSync(join(dirname(folder), '..', 'x.jpg'))).toBe(false)
    expect(existsSync(join(dirname(folder), 'x.jpg'))).toBe(false)
    const added = after.files.filter((f) => !before.files.includes(f))
    expect(added).toHaveLength(4)
    for (const f of added) expect(f).toMatch(/^[0-9a-f-]{36}(\.thumb)?\.jpg$/)
    const keys = running.data.db.$client.prepare('select storage_key as k from attachments where id in (?, ?)').all(attachments[0].id, attachments[1].id) as Array<{ k: string }>
    for (const { k } of keys) expect(added).toContain(k)
    expect((await get(attachments[0].url)).headers.get('content-disposition')).toBe(`inline; filename="x.jpg"; filename*=UTF-8''x.jpg`)
  })

  it('lets the office add files to a visit not assigned to them', async () => {
    const res = await upload(techVisit, cookies.office, [{ name: 'office.png', bytes: png }])
    expect(res.status).toBe(201)
  })
})

describe('refusals leave nothing behind', () => {
  async function expectRefused(send: () => Promise<Response>, status: number, message: RegExp) {
    const before = stored()
    const res = await send()
    const body = (await res.json()) as { error: string }
    expect([res.status, body.error]).toEqual([status, expect.stringMatching(message)])
    expect(stored()).toEqual(before)
  }

  it('refuses a file over the per-file limit with 413, naming the limit', async () => {
    const big = new Uint8Array(UPLOAD_LIMITS.fileBytes + 1)
    big.set(jpeg.subarray(0, 64))
    await expectRefused(() => upload(techVisit, cookies.tech, [{ name: 'huge.jpg', bytes: big }]), 413, /"huge\.jpg" is larger than 15 MB/)
  })

  it('refuses more than the per-request total with 413, whether the length is declared or counted as it streams', async () => {
    const part = new Uint8Array(14 * 1024 * 1024)
    part.set(jpeg.subarray(0, 64))
    const parts = [1, 2, 3].map((i) => ({ name: `big${i}.jpg`, bytes: part }))
    await expectRefused(() => upload(techVisit, cookies.tech, parts), 413, /larger than 40 MB in all/)
    // The same body sent chunked, with no Content-Length: the count while streaming stops it.
    const form = new FormData()
    for (const p of parts) form.append('file', new Blob([p.bytes as Uint8Array<ArrayBuffer>], { type: 'image/jpeg' }), p.name)
    const encoded = new Response(form)
    const bytes = new Uint8Array(await encoded.arrayBuffer())
    const chunked = new ReadableStream<Uint8Array>({
      start(c) {
        for (let i = 0; i < bytes.length; i += 1024 * 1024) c.enqueue(bytes.subarray(i, i + 1024 * 1024))
        c.close()
      },
    })
    await expectRefused(
      () =>
        fetch(`${running.server.url}/api/visits/${techVisit}/attachments`, {
          method: 'POST',
          headers: { Cookie: cookies.tech, Origin: running.server.url, 'Content-Type': encoded.headers.get('content-type')! },
          body: chunked,
          duplex: 'half',
        } as RequestInit),
      413,
      /larger than 40 MB in all/,
    )
  })

  it('refuses more than the per-request number of files with 413', async () => {
    const parts = Array.from({ length: UPLOAD_LIMITS.files + 1 }, (_, i) => ({ name: `p${i}.png`, bytes: png }))
    await expectRefused(() => upload(techVisit, cookies.tech, parts), 413, /at most 10 files/)
  })

  it('refuses a text file named .jpg with 415, by its bytes', async () => {
    await expectRefused(() => upload(techVisit, cookies.tech, [{ name: 'notes.jpg', bytes: TEXT, type: 'image/jpeg' }]), 415, /"notes\.jpg" is a file of no recognised type; only JPEG, PNG/)
  })

  it('refuses a GIF with 415, naming what it found', async () => {
    const gif = await sharp({ create: { width: 4, height: 4, channels: 3, background: '#000' } }).gif().toBuffer()
    await expectRefused(() => upload(techVisit, cookies.tech, [{ name: 'a.jpg', bytes: gif }]), 415, /is image\/gif \(\.gif\)/)
  })

  it('refuses the whole upload when one of its files is refused', async () => {
    await expectRefused(() => upload(techVisit, cookies.tech, [{ name: 'good.jpg', bytes: jpeg }, { name: 'bad.jpg', bytes: TEXT }]), 415, /"bad\.jpg"/)
  })

  it('refuses an empty file and a 0-byte image with 400', async () => {
    await expectRefused(() => upload(techVisit, cookies.tech, [{ name: 'empty.pdf', bytes: new Uint8Array(0), type: 'application/pdf' }]), 400, /^The file is empty: "empty\.pdf"/)
    await expectRefused(() => upload(techVisit, cookies.tech, [{ name: 'photo.jpg', bytes: new Uint8Array(0) }]), 400, /^The file is empty: "photo\.jpg"/)
  })

  it('refuses bytes that start like a JPEG but cannot be read as one', async () => {
    const broken = Buffer.concat([jpeg.subarray(0, 200), Buffer.alloc(2000, 7)])
    await expectRefused(() => upload(techVisit, cookies.tech, [{ name: 'broken.jpg', bytes: broken }]), 400, /"broken\.jpg" could not be read as an image/)
  })

  it('refuses a request that is not multipart with 415', async () => {
    await expectRefused(
      () =>
        fetch(`${running.server.url}/api/visits/${techVisit}/attachments`, {
          method: 'POST',
          headers: { Cookie: cookies.tech, Origin: running.server.url, 'Content-Type': 'application/json' },
          body: JSON.stringify({ file: 'x' }),
        }),
      415,
      /application\/json body is not accepted here.*multipart\/form-data/,
    )
  })

  it('refuses a request with no file and a detector the visit does not cover with 400', async () => {
    await expectRefused(() => upload(techVisit, cookies.tech, [], { detectorId: String(detectors[0]) }), 400, /No file was sent/)
    await expectRefused(() => upload(techVisit, cookies.tech, [{ name: 'a.jpg', bytes: jpeg }], { detectorId: String(detectors[2]) }), 400, new RegExp(`Detector ${detectors[2]} is not covered`))
    await expectRefused(() => upload(techVisit, cookies.tech, [{ name: 'a.jpg', bytes: jpeg }], { detectorId: 'abc' }), 400, /detectorId must be a detector number/)
  })

  it("refuses a technician on someone else's visit (403), a manager (403), nobody (401) and an unknown visit (404)", async () => {
    await expectRefused(() => upload(otherVisit, cookies.tech, [{ name: 'a.jpg', bytes: jpeg }]), 403, /not assigned to you/)
    await expectRefused(() => upload(techVisit, cookies.manager, [{ name: 'a.jpg', bytes: jpeg }]), 403, /The Manager role cannot record work on visits/)
    await expectRefused(() => upload(techVisit, '', [{ name: 'a.jpg', bytes: jpeg }]), 401, /Sign in/)
    await expectRefused(() => upload(999_999, cookies.office, [{ name: 'a.jpg', bytes: jpeg }]), 404, /No such visit/)
  })

  it('serves nothing for unknown ids or to nobody', async () => {
    expect((await get('/api/attachments/999999')).status).toBe(404)
    expect((await get('/api/attachments/999999/thumb')).status).toBe(404)
    expect((await get('/api/attachments/1', '')).status).toBe(401)
  })
})
