import { describe, expect, it } from 'vitest'
import { csvLine, guardCell, parseCsv, splitCsv, unguardCell } from '../../../shared/csv'

describe('parseCsv (RFC 4180)', () => {
  it('reads plain records with CRLF or LF line ends', () => {
    // RFC 4180 §2 rules 1–2: records end with CRLF; the last one may end without it.
    expect(parseCsv('a,b,c\r\nd,e,f').records).toEqual([['a', 'b', 'c'], ['d', 'e', 'f']])
    expect(parseCsv('a,b\nc,d\n').records).toEqual([['a', 'b'], ['c', 'd']])
    expect(parseCsv('a,b\rc,d\r').records).toEqual([['a', 'b'], ['c', 'd']])
  })

  it('reads quoted fields with separators, line breaks and doubled quotes', () => {
    // RFC 4180 §2 rules 5–7: fields may be enclosed in double quotes; quotes inside are doubled.
    const { records, errors } = parseCsv('"a,1","line\r\nbreak","say ""hi"""\r\n')
    expect(errors).toEqual([])
    expect(records).toEqual([['a,1', 'line\r\nbreak', 'say "hi"']])
  })

  it('keeps empty fields, including a trailing one, and spaces as data', () => {
    // RFC 4180 §2 rule 4: spaces are part of a field.
    expect(parseCsv('a,,c,\n ,x , ""\n').records).toEqual([['a', '', 'c', ''], [' ', 'x ', ' ""']])
  })

  it('skips a byte-order mark and reports where each record ends', () => {
    const text = '\uFEFFh1,h2\r\n"x\ny",2\nz,3'
    const { records, ends } = parseCsv(text)
    expect(records).toEqual([['h1', 'h2'], ['x\ny', '2'], ['z', '3']])
    expect(ends).toEqual([8, 16, 19])
  })

  it('counts blank lines as records so row numbers match the file', () => {
    expect(parseCsv('a\n\nb\n').records).toEqual([['a'], [''], ['b']])
  })

  it('reports an unclosed quote and text after a closing quote, naming the record', () => {
    expect(parseCsv('h\n"open\n', 1).errors).toEqual([{ record: 2, message: 'A quoted value is not closed: a double quote (") is missing.' }])
    const stray = parseCsv('a,"b"c,d\n', 5)
    expect(stray.errors).toEqual([{ record: 5, message: 'Text follows a closing quote. Put the whole value inside the quotes.' }])
    expect(stray.records).toEqual([['a', 'bc', 'd']])
  })

  it('keeps a lone quote inside an unquoted field as text (common practice: 12" pipe)', () => {
    expect(parseCsv('12" pipe,x\n').records).toEqual([['12" pipe', 'x']])
  })
})

describe('splitCsv', () => {
  it('cuts only at record ends, never inside a quoted line break, and loses nothing', () => {
    const text = 'h1,h2\n' + Array.from({ length: 200 }, (_, i) => `"r${i}\nsecond line",${i}`).join('\r\n') + '\n'
    const pieces = splitCsv(text, 97)
    expect(pieces.length).toBeGreaterThan(20)
    expect(pieces.join('')).toBe(text)
    const rows = pieces.flatMap((p) => parseCsv(p).records)
    expect(rows).toEqual(parseCsv(text).records)
    for (const p of pieces) expect(parseCsv(p).errors).toEqual([])
  })

  it('keeps a text without a final line end whole at the end', () => {
    expect(splitCsv('a\nb\nc', 2)).toEqual(['a\n', 'b\n', 'c'])
  })
})

describe('csvLine and formula guarding', () => {
  it('quotes only what needs quoting and ends with CRLF', () => {
    expect(csvLine(['a', 'b,c', 'say "x"', 'two\nlines', ' pad', 12.5, null, undefined])).toBe('a,"b,c","say ""x""","two\nlines"," pad",12.5,,\r\n')
  })

  it('round-trips any text through csvLine and parseCsv', () => {
    const values = ['', ',', '""', 'a\r\nb', 'ÆØÅ', '  x  ', 'tab\there']
    expect(parseCsv(csvLine(values)).records).toEqual([values])
  })

  it('defuses spreadsheet formulas on export and restores them on import (OWASP CSV injection)', () => {
    for (const v of ['=1+1', '+T1', '-x', '@SUM(A1)', '\tcmd']) {
      expect(guardCell(v)).toBe(`'${v}`)
      expect(unguardCell(guardCell(v))).toBe(v)
    }
    expect(guardCell('T1')).toBe('T1')
    expect(unguardCell("'quoted")).toBe("'quoted")
  })
})
