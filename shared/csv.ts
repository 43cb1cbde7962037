// A small CSV reader and writer after RFC 4180 (comma separator, optional double-quoted fields, "" for a quote
// inside quotes, CRLF or LF line ends). Shared so that the browser cuts a file into uploads exactly where the
// server's parser would see a record end.

export interface CsvParseError {
  /** 1-based number of the record (the header is record 1, as a spreadsheet numbers rows). */
  record: number
  message: string
}

export interface CsvParseResult {
  records: string[][]
  /** Offset just past each record's line end (or the end of the text), parallel to `records`. */
  ends: number[]
  errors: CsvParseError[]
}

const QUOTE = 34
const COMMA = 44
const CR = 13
const LF = 10

/**
 * Parses CSV text into records of fields. Lenient where it is harmless (a lone quote inside an unquoted field
 * is kept as text; a missing final line end is fine), strict where data would be guessed (text after a closing
 * quote, an unclosed quote): those become errors naming the record.
 */
export function parseCsv(text: string, firstRecord = 1): CsvParseResult {
  const records: string[][] = []
  const ends: number[] = []
  const errors: CsvParseError[] = []
  let start = 0
  if (text.charCodeAt(0) === 0xfeff) start = 1
  let record: string[] = []
  let field = ''
  let i = start
  const n = text.length
  let recordHasError = false

  const endRecord = (end: number) => {
    record.push(field)
    records.push(record)
    ends.push(end)
    record = []
    field = ''
    recordHasError = false
  }

  while (i < n) {
    const c = text.charCodeAt(i)
    if (c === QUOTE && field === '' ) {
      // A quoted field: read to the closing quote, "" being one quote.
      let j = i + 1
      let value = ''
      let closed = false
      while (j < n) {
        const q = text.indexOf('"', j)
        if (q === -1) break
        value += text.slice(j, q)
        if (text.charCodeAt(q + 1) === QUOTE) {
          value += '"'
          j = q + 2
          continue
        }
        j = q + 1
        closed = true
        break
      }
      if (!closed) {
        errors.push({ record: firstRecord + records.length, message: 'A quoted value is not closed: a double quote (") is missing.' })
        field = value + text.slice(j)
        i = n
        break
      }
      field = value
      i = j
      // After the closing quote only a separator or a line end may follow.
      const next = i < n ? text.charCodeAt(i) : -1
      if (next !== COMMA && next !== CR && next !== LF && next !== -1) {
        if (!recordHasError) {
          errors.push({ record: firstRecord + records.length, message: 'Text follows a closing quote. Put the whole value inside the quotes.' })
          recordHasError = true
        }
        // Keep the stray text so that nothing is silently lost; the row is reported anyway.
        let k = i
        while (k < n && text.charCodeAt(k) !== COMMA && text.charCodeAt(k) !== CR && text.charCodeAt(k) !== LF) k++
        field += text.slice(i, k)
        i = k
      }
      continue
    }
    if (c === COMMA) {
      record.push(field)
      field = ''
      i++
      continue
    }
    if (c === CR || c === LF) {
      const end = c === CR && text.charCodeAt(i + 1) === LF ? i + 2 : i + 1
      endRecord(end)
      i = end
      continue
    }
    // An unquoted run up to the next separator, line end or end of text.
    let k = i
    while (k < n) {
      const d = text.charCodeAt(k)
      if (d === COMMA || d === CR || d === LF) break
      k++
    }
    field += text.slice(i, k)
    i = k
  }
  // The last record when the text does not end with a line end.
  if (field !== '' || record.length > 0) endRecord(n)
  return { records, ends, errors }
}

/** True when every field of a record is blank (a blank line in the file). */
export function isBlankRecord(record: readonly string[]): boolean {
  return record.every((f) => f.trim() === '')
}

/**
 * Cuts CSV text into pieces of about `targetChars` characters, each ending at a record boundary, so that each
 * piece parses on its own. A single record longer than the target makes a longer piece.
 */
export function splitCsv(text: string, targetChars: number): string[] {
  const { ends } = parseCsv(text)
  const pieces: string[] = []
  let from = 0
  for (const end of ends) {
    if (end - from >= targetChars) {
      pieces.push(text.slice(from, end))
      from = end
    }
  }
  if (from < text.length) pieces.push(text.slice(from))
  return pieces
}

const FORMULA_START = /^[=+\-@\t\r]/

/**
 * A text cell made safe for spreadsheets: a value that starts like a formula gets a leading apostrophe, so that
 * opening an exported file never runs it (OWASP "CSV injection"). `unguardCell` reverses it on import.
 */
export function guardCell(value: string): string {
  return FORMULA_START.test(value) ? `'${value}` : value
}

/** Removes the apostrophe `guardCell` added. */
export function unguardCell(value: string): string {
  return value.startsWith("'") && FORMULA_START.test(value.slice(1)) ? value.slice(1) : value
}

/** One CSV line (RFC 4180: quoted when needed, CRLF at the end). */
export function csvLine(values: ReadonlyArray<string | number | null | undefined>): string {
  return values.map((v) => {
    const s = v == null ? '' : String(v)
    return /[",\r\n]|^\s|\s$/.test(s) ? `"${s.replaceAll('"', '""')}"` : s
  }).join(',') + '\r\n'
}
