import { parse } from 'csv-parse'
import { createReadStream } from 'node:fs'
import { open } from 'node:fs/promises'
import { Transform, pipeline } from 'node:stream'
import { unsafeCell } from './cells'

/** A file refused for what it holds or how it is written; the route answers with its status and words. */
export class ImportRefusal extends Error {
  constructor(
    readonly status: number,
    message: string,
  ) {
    super(message)
  }
}

const SAVE_AS = 'Save it from the spreadsheet as "CSV UTF-8 (comma delimited)" and upload it again.'

/**
 * Passes the bytes on as text, refusing any that are not UTF-8: a file saved in a legacy code page
 * would otherwise bring names in with their accents silently replaced. The UTF-8 byte order mark
 * that spreadsheets write is dropped by the decoder.
 */
function utf8Text(): Transform {
  const decoder = new TextDecoder('utf-8', { fatal: true })
  let lines = 1
  let first = true
  const count = (text: string) => {
    for (let i = text.indexOf('\n'); i !== -1; i = text.indexOf('\n', i + 1)) lines++
  }
  const refuse = (at = lines) => new ImportRefusal(422, `The file is not UTF-8 text: the bytes on line ${at} cannot be read as UTF-8 (a legacy code page such as Windows-1252 perhaps). ${SAVE_AS}`)
  return new Transform({
    readableObjectMode: false,
    decodeStrings: true,
    transform(chunk: Buffer, _enc, done) {
      if (first) {
        first = false
        if ((chunk[0] === 0xff && chunk[1] === 0xfe) || (chunk[0] === 0xfe && chunk[1] === 0xff)) {
          return done(new ImportRefusal(422, `The file is UTF-16 text ("Unicode text"), not UTF-8. ${SAVE_AS}`))
        }
      }
      if (chunk.includes(0)) return done(new ImportRefusal(422, `The file holds binary data (a spreadsheet workbook perhaps), not CSV text. ${SAVE_AS}`))
      let text: string
      try {
        text = decoder.decode(chunk, { stream: true })
      } catch {
        // The line of the first unreadable byte: where a lenient decoder puts its replacement mark.
        const lenient = new TextDecoder('utf-8').decode(chunk)
        const before = lenient.slice(0, Math.max(0, lenient.indexOf('\uFFFD')))
        return done(refuse(lines + before.split('\n').length - 1))
      }
      count(text)
      done(null, text)
    },
    flush(done) {
      try {
        done(null, decoder.decode())
      } catch {
        done(refuse())
      }
    },
  })
}

/** The delimiter of the header line: comma, semicolon (spreadsheets in many locales) or tab. */
export async function sniffDelimiter(path: string): Promise<',' | ';' | '\t'> {
  const handle = await open(path, 'r')
  try {
    const { buffer, bytesRead } = await handle.read(Buffer.alloc(8192), 0, 8192, 0)
    const head = buffer.subarray(0, bytesRead).toString('latin1').split(/\r?\n/)[0].replace(/"[^"]*"/g, '')
    const counts = ([',', ';', '\t'] as const).map((d) => [d, head.split(d).length - 1] as const)
    return counts.reduce((best, c) => (c[1] > best[1] ? c : best))[0]
  } finally {
    await handle.close()
  }
}

export interface CsvRow {
  /** The row's number as a spreadsheet shows it: the header is row 1. */
  row: number
  cells: string[]
}

/**
 * The file's records one at a time, the header first, read as a stream: a file of any length costs
 * the memory of one chunk. Refuses non-UTF-8 bytes and malformed CSV with the line where it broke.
 */
export async function* readRows(path: string, delimiter: string): AsyncGenerator<CsvRow> {
  let failure: unknown = null
  const parser = parse({ delimiter, relax_column_count: true, skip_empty_lines: true, max_record_size: 64 * 1024 })
  pipeline(createReadStream(path), utf8Text(), parser, (error) => {
    if (error) failure = error
  })
  let row = 0
  try {
    for await (const record of parser as AsyncIterable<string[]>) {
      row++
      yield { row, cells: record.map(unsafeCell) }
    }
  } catch (error) {
    const cause = failure ?? error
    if (cause instanceof ImportRefusal) throw cause
    const message = cause instanceof Error ? cause.message : String(cause)
    throw new ImportRefusal(422, `The file could not be read as CSV near row ${row + 1}: ${message}`)
  }
  if (failure instanceof ImportRefusal) throw failure
}

/** The header, the first few rows and the number of data rows; refuses an empty or header-only file. */
export async function scanFile(path: string, delimiter: string): Promise<{ headers: string[]; sample: string[][]; rows: number }> {
  let headers: string[] | null = null
  const sample: string[][] = []
  let rows = 0
  for await (const { cells } of readRows(path, delimiter)) {
    if (!headers) {
      headers = cells.map((h) => h.trim())
      continue
    }
    rows++
    if (sample.length < 5) sample.push(cells)
  }
  if (!headers) throw new ImportRefusal(422, 'The file is empty: it has no header row and no data.')
  if (rows === 0) throw new ImportRefusal(422, 'The file has a header row but no data rows: there is nothing to import.')
  const blank = headers.findIndex((h) => h === '')
  if (blank !== -1) throw new ImportRefusal(422, `Column ${blank + 1} of the header row has no name; name every column and upload again.`)
  const seen = new Set<string>()
  for (const h of headers) {
    if (seen.has(h)) throw new ImportRefusal(422, `Two columns of the header row are both named "${h}"; give each column its own name.`)
    seen.add(h)
  }
  return { headers, sample, rows }
}
