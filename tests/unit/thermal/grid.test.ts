import { describe, expect, it } from 'vitest'
import { objectTemperature } from '#shared/thermal'
import {
  GRID_LIMITS,
  GridCorrector,
  clipRegion,
  gridFromBytes,
  gridToBytes,
  parseGridCsv,
  regionContains,
  regionStats,
  type ParsedGrid,
} from '#shared/thermal/grid'

function ok(text: string, unit: 'C' | 'F' = 'C'): ParsedGrid {
  const r = parseGridCsv(text, unit)
  if (!r.ok) throw new Error(`expected a grid, got: ${r.problem.message}`)
  return r.grid
}
function bad(text: string, unit: 'C' | 'F' = 'C') {
  const r = parseGridCsv(text, unit)
  if (r.ok) throw new Error('expected a problem')
  return r.problem
}

describe('parseGridCsv: accepted shapes', () => {
  it('reads comma-separated rows, row-major, with min and max', () => {
    const g = ok('20,21,22\n23,24.5,-3\n')
    expect([g.width, g.height, g.separator]).toEqual([3, 2, 'comma'])
    expect(Array.from(g.valuesC)).toEqual([20, 21, 22, 23, 24.5, -3])
    expect([g.minC, g.maxC]).toEqual([-3, 24.5])
  })

  it('reads semicolons and tabs with a decimal comma, and runs of spaces', () => {
    const semi = ok('20,5;21\r\n22;23,25\r\n')
    expect(semi.separator).toBe('semicolon')
    expect(semi.decimalComma).toBe(true)
    expect(Array.from(semi.valuesC)).toEqual([20.5, 21, 22, 23.25])
    const tab = ok('1,5\t2\n3\t4,75')
    expect(tab.separator).toBe('tab')
    expect(Array.from(tab.valuesC)).toEqual([1.5, 2, 3, 4.75])
    const ws = ok('  1   2.5  3\n4 5 6   \n')
    expect(ws.separator).toBe('whitespace')
    expect(Array.from(ws.valuesC)).toEqual([1, 2.5, 3, 4, 5, 6])
  })

  it('allows blank trailing lines, a BOM, spaces around values, one trailing separator, signs and exponents', () => {
    const g = ok('\uFEFF 1 , +2 ,3,\n1e1,−2,2.5E-1,\n\n  \n\n')
    expect([g.width, g.height]).toEqual([3, 2])
    expect(Array.from(g.valuesC)).toEqual([1, 2, 3, 10, -2, 0.25])
  })

  it('reads old Mac line ends (CR only) and mixed CRLF', () => {
    expect(Array.from(ok('1,2\r3,4\r\n5,6\r').valuesC)).toEqual([1, 2, 3, 4, 5, 6])
  })

  it('converts °F to °C (°C = (°F − 32) × 5/9, the definition of the two scales)', () => {
    const g = ok('32,212\n-40,98.6', 'F')
    const v = Array.from(g.valuesC)
    expect(v[0]).toBeCloseTo(0, 5)
    expect(v[1]).toBeCloseTo(100, 4)
    expect(v[2]).toBeCloseTo(-40, 5)
    expect(v[3]).toBeCloseTo(37, 4)
  })

  it('keeps the parsed value as Number() would read it (to Float32 precision)', () => {
    const text = ['0.1', '123.456', '-59.99', '1999.875', '0.000123', '12345678901234567890e-17'].join(',') + '\n' + ['1', '2', '3', '4', '5', '6'].join(',')
    const g = ok(text)
    const expected = text.split('\n')[0]!.split(',').map(Number)
    expected.forEach((e, i) => expect(g.valuesC[i]).toBe(Math.fround(e)))
  })
})

describe('parseGridCsv: refusals name the row and column', () => {
  it('a word in a cell', () => {
    expect(bad('1,2,3\n4,abc,6')).toEqual({ row: 2, column: 2, message: 'Row 2, column 2: “abc” is not a number.' })
  })
  it('an empty cell', () => {
    expect(bad('1,,3\n4,5,6')).toMatchObject({ row: 1, column: 2, message: 'Row 1, column 2 is empty.' })
  })
  it('a short row and a long row', () => {
    expect(bad('1,2,3\n4,5\n7,8,9')).toMatchObject({ row: 2, column: 3, message: expect.stringContaining('Row 2 has 2 values; row 1 has 3') })
    expect(bad('1,2\n4,5,6')).toMatchObject({ row: 2, column: 3, message: expect.stringContaining('more values than row 1') })
  })
  it('a blank line in the middle', () => {
    expect(bad('1,2\n\n3,4')).toMatchObject({ row: 2, column: 0 })
  })
  it('a decimal comma in a comma-separated file cannot be told apart, so the rows come out uneven', () => {
    expect(bad('1,5,2\n3,4').message).toContain('row 1 has 3')
  })
  it('values outside −60 … 2000 °C, said in the file’s unit', () => {
    expect(bad('1,2\n3,2001')).toMatchObject({ row: 2, column: 2, message: 'Row 2, column 2: 2001 °C is outside −60 °C to 2000 °C.' })
    expect(bad('-61,2\n3,4')).toMatchObject({ row: 1, column: 1 })
    // −60 °C = −76 °F (common practice: °F = °C × 9/5 + 32)
    expect(bad('-77,2\n3,4', 'F')).toMatchObject({ row: 1, column: 1, message: 'Row 1, column 1: −77 °F is outside −76 °F to 3632 °F.' })
    expect(ok('-76,3632\n0,0', 'F').valuesC[1]).toBeCloseTo(2000, 3)
  })
  it('NaN, Infinity and lone signs are not numbers', () => {
    expect(bad('NaN,1\n1,1').column).toBe(1)
    expect(bad('1,Infinity\n1,1').column).toBe(2)
    expect(bad('1,-\n1,1').column).toBe(2)
    expect(bad('1,.\n1,1').column).toBe(2)
  })
  it('an empty file, one row, one column', () => {
    expect(bad('\n\n').message).toBe('The file holds no numbers.')
    expect(bad('1,2,3').message).toContain('at least 2')
    expect(bad('1\n2').message).toContain('at least 2 columns')
  })
  it('too many rows or columns', () => {
    const wide = Array.from({ length: GRID_LIMITS.maxWidth + 1 }, () => '20').join(',')
    expect(bad(`${wide}\n${wide}`)).toMatchObject({ row: 1, column: GRID_LIMITS.maxWidth + 1 })
    const tall = Array.from({ length: GRID_LIMITS.maxHeight + 1 }, () => '1,2').join('\n')
    expect(bad(tall).message).toContain(`at most ${GRID_LIMITS.maxHeight}`)
  })
  it('reads a 640 × 480 grid', () => {
    const row = Array.from({ length: 640 }, (_, i) => (20 + i / 100).toFixed(2)).join(',')
    const g = ok(Array.from({ length: 480 }, () => row).join('\n'))
    expect([g.width, g.height, g.valuesC.length]).toEqual([640, 480, 307_200])
    expect(g.valuesC[307_199]).toBeCloseTo(26.39, 4)
  })
})

describe('region statistics (hand-computed)', () => {
  // 4 × 3 grid:
  //  1  2  3  4
  //  5  6  7  8
  //  9 10 11 12
  const values = new Float32Array([1, 2, 3, 4, 5, 6, 7, 8, 9, 10, 11, 12])

  it('a box: max 11 at (2, 2), min 2 at (1, 0), mean (2+3+6+7+10+11)/6 = 6.5, 6 pixels', () => {
    const s = regionStats(values, 4, 3, { shape: 'box', x: 1, y: 0, w: 2, h: 3 })!
    expect(s).toEqual({ max: 11, maxAt: { x: 2, y: 2 }, min: 2, minAt: { x: 1, y: 0 }, mean: 6.5, count: 6, skipped: 0 })
  })

  it('an ellipse inscribed in the whole 4 × 3 grid leaves out the four corners: mean of the other 8 = 6.5', () => {
    // Centre (2, 1.5), radii 2 and 1.5; corner pixel centres (0.5, 0.5) give (0.75)² + (0.667)² > 1, so they are out;
    // (1.5, 0.5) gives 0.0625 + 0.444 ≤ 1, so it is in.
    const r = { shape: 'ellipse' as const, x: 0, y: 0, w: 4, h: 3 }
    expect(regionContains(r, 0, 0)).toBe(false)
    expect(regionContains(r, 1, 0)).toBe(true)
    const s = regionStats(values, 4, 3, r)!
    expect(s.count).toBe(8)
    expect(s.mean).toBe((2 + 3 + 5 + 6 + 7 + 8 + 10 + 11) / 8)
    expect([s.max, s.min]).toEqual([11, 2])
  })

  it('skips NaN pixels and counts them', () => {
    const v = values.slice()
    v[5] = Number.NaN
    const s = regionStats(v, 4, 3, { shape: 'box', x: 0, y: 0, w: 4, h: 3 })!
    expect(s.count).toBe(11)
    expect(s.skipped).toBe(1)
    expect(s.mean).toBeCloseTo((78 - 6) / 11, 10)
  })

  it('refuses regions outside the grid and clips drawn ones', () => {
    expect(regionStats(values, 4, 3, { shape: 'box', x: 3, y: 0, w: 2, h: 1 })).toBeNull()
    expect(clipRegion({ shape: 'box', x: -2, y: 1, w: 10, h: 10 }, 4, 3)).toEqual({ shape: 'box', x: 0, y: 1, w: 4, h: 2 })
    expect(clipRegion({ shape: 'box', x: 5, y: 1, w: 2, h: 2 }, 4, 3)).toBeNull()
  })
})

describe('GridCorrector (correctFrame on a grid)', () => {
  const band = { fromUm: 7.5, toUm: 14 }
  const apparentC = new Float32Array([20, 35.5, 60, 85, 120, 250, 400, 900])

  it('agrees with the engine’s single-pixel objectTemperature to 0.01 K (the frame benchmark’s accuracy target)', () => {
    const corrector = new GridCorrector(apparentC)
    for (const [emissivity, reflectedC] of [[0.95, 20], [0.7, 15], [0.4, 25]] as const) {
      const out = corrector.correct({ emissivity, reflectedC, band })
      apparentC.forEach((a, i) => {
        const exact = objectTemperature({ apparentK: Math.fround(a + 273.15), emissivity, reflectedK: reflectedC + 273.15, band }) - 273.15
        expect(Math.abs(out[i]! - exact), `ε ${emissivity}, ${a} °C`).toBeLessThan(0.01)
      })
    }
  })

  it('ε = 1 with τ = 1 gives back the apparent temperatures (the measurement equation reduces to W_obj = W_app)', () => {
    const out = new GridCorrector(apparentC).correct({ emissivity: 1, reflectedC: 20, band })
    apparentC.forEach((a, i) => expect(out[i]).toBeCloseTo(a, 2))
  })

  it('gives NaN, not an exception, for a pixel no object temperature explains', () => {
    // Reflected source at 300 °C, ε 0.1: a 20 °C reading is colder than the reflection alone.
    const out = new GridCorrector(new Float32Array([20, 400])).correct({ emissivity: 0.1, reflectedC: 300, band })
    expect(Number.isNaN(out[0]!)).toBe(true)
    expect(Number.isFinite(out[1]!)).toBe(true)
  })
})

describe('stored bytes', () => {
  it('round-trips little-endian Float32', () => {
    const v = new Float32Array([20.5, -3.25, 1999.5, Number.NaN])
    const bytes = gridToBytes(v)
    expect(bytes.byteLength).toBe(16)
    // 20.5 = 0x41A40000 (IEEE 754 single), little-endian: 00 00 A4 41
    expect(Array.from(bytes.subarray(0, 4))).toEqual([0x00, 0x00, 0xa4, 0x41])
    const back = gridFromBytes(bytes)
    expect(Array.from(back.subarray(0, 3))).toEqual([20.5, -3.25, 1999.5])
    expect(Number.isNaN(back[3]!)).toBe(true)
    expect(() => gridFromBytes(new Uint8Array(3))).toThrow()
  })
})
