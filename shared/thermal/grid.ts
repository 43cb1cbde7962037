// Temperature grids: a CSV matrix of apparent temperatures read into a Float32Array (°C), statistics over a box or an
// ellipse, and the whole-grid correction through the engine's correctFrame. Shared by the server (which parses and
// checks every upload) and the browser (which draws it), so both read a file exactly alike.
import type { Band } from './planck'
import { correctFrame } from './frame'
import { ZERO_CELSIUS_K } from './constants'

/** Unit the person says the file's numbers are in; values are converted to °C on reading. */
export type GridUnit = 'C' | 'F'

/** Limits of an accepted grid (documented in the README). */
export const GRID_LIMITS = {
  /** Columns: 1280 covers the largest common radiometric imagers (1280 × 1024) with room for 640 × 480. */
  maxWidth: 1280,
  maxHeight: 1024,
  minWidth: 2,
  minHeight: 2,
  /** Apparent temperatures, °C: colder is not an electrical-survey scene; hotter is beyond the engine's grid tables' use here. */
  minC: -60,
  maxC: 2000,
  /** Characters of CSV text: 1280 × 1024 values of up to about 14 characters each. */
  maxChars: 20_000_000,
} as const

export type GridSeparator = 'comma' | 'semicolon' | 'tab' | 'whitespace'

export const GRID_SEPARATOR_LABELS: Record<GridSeparator, string> = {
  comma: 'comma',
  semicolon: 'semicolon',
  tab: 'tab',
  whitespace: 'spaces',
}

export interface ParsedGrid {
  width: number
  height: number
  /** Row-major apparent temperatures, °C (row 0 is the top of the picture). */
  valuesC: Float32Array
  minC: number
  maxC: number
  separator: GridSeparator
  decimalComma: boolean
}

export interface GridProblem {
  /** 1-based row of the file (blank trailing lines are not counted); 0 when the problem is the whole file. */
  row: number
  /** 1-based column (value number within the row); 0 when the problem is the whole row or file. */
  column: number
  message: string
}

export type GridParseResult = { ok: true; grid: ParsedGrid } | { ok: false; problem: GridProblem }

const LF = 10
const CR = 13
const TAB = 9
const SPACE = 32
const COMMA = 44
const SEMI = 59
const DOT = 46
const PLUS = 43
const MINUS = 45
const UNICODE_MINUS = 0x2212
const ZERO = 48
const NINE = 57
const LOWER_E = 101
const UPPER_E = 69

const POW10 = Array.from({ length: 23 }, (_, i) => 10 ** i)

function problem(row: number, column: number, message: string): GridParseResult {
  return { ok: false, problem: { row, column, message } }
}

/** Which separator a row uses: tab, then semicolon, then comma, otherwise runs of spaces. */
export function detectSeparator(line: string): GridSeparator {
  if (line.includes('\t')) return 'tab'
  if (line.includes(';')) return 'semicolon'
  if (line.includes(',')) return 'comma'
  return 'whitespace'
}

/** Bounds of each line (CRLF, LF or CR ends), without trailing blank lines; a leading BOM is skipped. */
function lineBounds(text: string): Array<[number, number]> {
  const lines: Array<[number, number]> = []
  let start = text.charCodeAt(0) === 0xfeff ? 1 : 0
  const n = text.length
  for (let i = start; i <= n; i++) {
    const c = i < n ? text.charCodeAt(i) : LF
    if (c !== LF && c !== CR) continue
    lines.push([start, i])
    if (c === CR && text.charCodeAt(i + 1) === LF) i++
    start = i + 1
  }
  // A final line end leaves an empty last "line"; blank lines at the end are allowed and dropped.
  while (lines.length && isBlank(text, lines[lines.length - 1]!)) lines.pop()
  return lines
}

function isBlank(text: string, [a, b]: [number, number]): boolean {
  for (let i = a; i < b; i++) {
    const c = text.charCodeAt(i)
    if (c !== SPACE && c !== TAB) return false
  }
  return true
}

function formatC(c: number, unit: GridUnit): string {
  const v = unit === 'C' ? c : (c * 9) / 5 + 32
  return `${Number(v.toFixed(1)).toString().replace('-', '−')} °${unit}`
}

/**
 * Reads a CSV grid of temperatures. Accepted shape: one row of the picture per line, the same number of values in
 * every row, separated by commas, semicolons, tabs or runs of spaces (the separator is taken from the first row).
 * A decimal comma is accepted with semicolon or tab separators. Blank lines at the end are ignored; a single
 * separator at the end of a line is ignored. No header row. The numbers are in `unit` and come back in °C.
 */
export function parseGridCsv(text: string, unit: GridUnit): GridParseResult {
  if (text.length > GRID_LIMITS.maxChars) {
    return problem(0, 0, `The file is too large (${text.length.toLocaleString('en-GB')} characters; at most ${GRID_LIMITS.maxChars.toLocaleString('en-GB')}).`)
  }
  const lines = lineBounds(text)
  if (lines.length === 0) return problem(0, 0, 'The file holds no numbers.')
  if (lines.length > GRID_LIMITS.maxHeight) {
    return problem(GRID_LIMITS.maxHeight + 1, 0, `The grid has ${lines.length} rows; at most ${GRID_LIMITS.maxHeight} are accepted.`)
  }
  const first = text.slice(lines[0]![0], lines[0]![1])
  const separator = detectSeparator(first)
  const sepCode = separator === 'comma' ? COMMA : separator === 'semicolon' ? SEMI : separator === 'tab' ? TAB : -1
  const decimalCode = separator === 'semicolon' || separator === 'tab' ? -2 : DOT // -2: either mark accepted
  const loC = unit === 'C' ? GRID_LIMITS.minC : (GRID_LIMITS.minC * 9) / 5 + 32
  const hiC = unit === 'C' ? GRID_LIMITS.maxC : (GRID_LIMITS.maxC * 9) / 5 + 32
  let values: Float32Array = new Float32Array(64)
  let width = -1
  let count = 0
  let min = Infinity
  let max = -Infinity
  let decimalComma = false

  for (let r = 0; r < lines.length; r++) {
    const [a, b] = lines[r]!
    const row = r + 1
    let p = a
    let col = 0
    if (isBlank(text, [a, b])) return problem(row, 0, `Row ${row} is blank: blank lines are only allowed at the end of the file.`)
    while (p < b) {
      // Skip spaces before the value (and tabs, unless tab is the separator).
      let c = text.charCodeAt(p)
      while (p < b && (c === SPACE || (c === TAB && sepCode !== TAB))) c = text.charCodeAt(++p)
      if (p >= b) {
        if (sepCode === -1) break // trailing spaces in a space-separated row
        if (col > 0) break // a single separator at the end of the row
      }
      col++
      if (width > 0 && col > width) return problem(row, col, `Row ${row} has more values than row 1 (${width}); every row needs the same number of values.`)
      if (col > GRID_LIMITS.maxWidth) return problem(row, col, `Row ${row} has more than ${GRID_LIMITS.maxWidth} values; at most ${GRID_LIMITS.maxWidth} columns are accepted.`)
      const cellStart = p
      // The number: sign, digits, one decimal mark, digits, optional exponent.
      let neg = false
      c = text.charCodeAt(p)
      if (c === MINUS || c === UNICODE_MINUS) {
        neg = true
        c = text.charCodeAt(++p)
      } else if (c === PLUS) {
        c = text.charCodeAt(++p)
      }
      let mant = 0
      let sig = 0
      let frac = 0
      let sawMark = false
      let hadDigits = false
      while (p < b) {
        if (c >= ZERO && c <= NINE) {
          hadDigits = true
          if (sig < 15) {
            mant = mant * 10 + (c - ZERO)
            if (mant > 0) sig++
            if (sawMark) frac++
          } else if (!sawMark) {
            frac-- // an integer digit past 15 significant ones: only its magnitude counts
          }
        } else if (!sawMark && (c === DOT || (c === COMMA && decimalCode === -2))) {
          sawMark = true
          if (c === COMMA) decimalComma = true
        } else break
        c = text.charCodeAt(++p)
      }
      let exp = 0
      if (hadDigits && p < b && (c === LOWER_E || c === UPPER_E)) {
        let q = p + 1
        let en = false
        let ec = text.charCodeAt(q)
        if (ec === MINUS || ec === PLUS) {
          en = ec === MINUS
          ec = text.charCodeAt(++q)
        }
        const expStart = q
        while (q < b && ec >= ZERO && ec <= NINE) {
          exp = exp * 10 + (ec - ZERO)
          ec = text.charCodeAt(++q)
        }
        if (q > expStart) {
          if (en) exp = -exp
          p = q
          c = ec
        }
      }
      // After the number only spaces, then the separator or the end of the row.
      while (p < b && (c === SPACE || (c === TAB && sepCode !== TAB))) c = text.charCodeAt(++p)
      const atEnd = p >= b
      const atSep = !atEnd && sepCode !== -1 && c === sepCode
      if (!hadDigits || !(atEnd || atSep || sepCode === -1)) {
        let e = cellStart
        while (e < b && (sepCode === -1 ? text.charCodeAt(e) !== SPACE && text.charCodeAt(e) !== TAB : text.charCodeAt(e) !== sepCode)) e++
        const cell = text.slice(cellStart, e).trim()
        if (cell === '') return problem(row, col, `Row ${row}, column ${col} is empty.`)
        return problem(row, col, `Row ${row}, column ${col}: “${cell.slice(0, 24)}” is not a number.`)
      }
      if (atSep) p++
      const scale = frac - exp
      let v = scale >= 0 ? (scale < POW10.length ? mant / POW10[scale]! : mant / 10 ** scale) : scale > -POW10.length ? mant * POW10[-scale]! : mant * 10 ** -scale
      if (neg) v = -v
      if (!(v >= loC && v <= hiC)) {
        return problem(row, col, `Row ${row}, column ${col}: ${formatC(unit === 'C' ? v : ((v - 32) * 5) / 9, unit)} is outside ${formatC(GRID_LIMITS.minC, unit)} to ${formatC(GRID_LIMITS.maxC, unit)}.`)
      }
      const vc = unit === 'C' ? v : ((v - 32) * 5) / 9
      if (count >= values.length) {
        const grown: Float32Array = new Float32Array(width > 0 ? width * lines.length : values.length * 2)
        grown.set(values)
        values = grown
      }
      values[count++] = vc
      if (vc < min) min = vc
      if (vc > max) max = vc
    }
    if (width < 0) {
      width = col
      if (width < GRID_LIMITS.minWidth) return problem(row, 0, `Row 1 has ${width} value${width === 1 ? '' : 's'}; a grid needs at least ${GRID_LIMITS.minWidth} columns.`)
      if (values.length < width * lines.length) {
        const sized = new Float32Array(width * lines.length)
        sized.set(values.subarray(0, count))
        values = sized
      }
    } else if (col !== width) {
      return problem(row, col + 1, `Row ${row} has ${col} value${col === 1 ? '' : 's'}; row 1 has ${width}. Every row needs the same number of values.`)
    }
  }
  const height = lines.length
  if (height < GRID_LIMITS.minHeight) return problem(0, 0, `The grid has ${height} row; at least ${GRID_LIMITS.minHeight} are needed.`)
  const valuesC = values.length === width * height ? values : values.slice(0, width * height)
  return { ok: true, grid: { width, height, valuesC, minC: min, maxC: max, separator, decimalComma } }
}

/** A marked region of the grid: the pixels of a box, or of the ellipse inscribed in it. Pixel coordinates, 0-based. */
export interface GridRegion {
  shape: 'box' | 'ellipse'
  /** Left column. */
  x: number
  /** Top row. */
  y: number
  /** Columns covered (≥ 1). */
  w: number
  /** Rows covered (≥ 1). */
  h: number
}

export interface RegionStats {
  max: number
  /** Pixel holding the maximum (first in row order on ties). */
  maxAt: { x: number; y: number }
  min: number
  minAt: { x: number; y: number }
  mean: number
  /** Pixels with a value. */
  count: number
  /** Pixels inside the region without a value (NaN: a correction no object temperature explains). */
  skipped: number
}

/** Clips a region to the grid; null when nothing is left. */
export function clipRegion(r: GridRegion, width: number, height: number): GridRegion | null {
  const x0 = Math.max(0, Math.floor(r.x))
  const y0 = Math.max(0, Math.floor(r.y))
  const x1 = Math.min(width, Math.floor(r.x) + Math.max(1, Math.floor(r.w)))
  const y1 = Math.min(height, Math.floor(r.y) + Math.max(1, Math.floor(r.h)))
  if (x1 <= x0 || y1 <= y0) return null
  return { shape: r.shape, x: x0, y: y0, w: x1 - x0, h: y1 - y0 }
}

/** Whether pixel (px, py) belongs to the region: every pixel of a box; for an ellipse, pixels whose centre is inside it. */
export function regionContains(r: GridRegion, px: number, py: number): boolean {
  if (px < r.x || py < r.y || px >= r.x + r.w || py >= r.y + r.h) return false
  if (r.shape === 'box') return true
  const rx = r.w / 2
  const ry = r.h / 2
  const dx = (px + 0.5 - (r.x + rx)) / rx
  const dy = (py + 0.5 - (r.y + ry)) / ry
  return dx * dx + dy * dy <= 1
}

/**
 * Max (with its pixel), min, mean and pixel count of the values inside a region (the region is taken in the
 * original grid's pixel coordinates, unclipped). Null when the region holds no pixel with a value.
 */
export function regionStats(values: Float32Array, width: number, height: number, region: GridRegion): RegionStats | null {
  const r = region.w >= 1 && region.h >= 1 ? region : null
  if (!r || r.x < 0 || r.y < 0 || r.x + r.w > width || r.y + r.h > height) return null
  let max = -Infinity
  let min = Infinity
  let sum = 0
  let count = 0
  let skipped = 0
  const maxAt = { x: -1, y: -1 }
  const minAt = { x: -1, y: -1 }
  for (let y = r.y; y < r.y + r.h; y++) {
    for (let x = r.x; x < r.x + r.w; x++) {
      if (!regionContains(r, x, y)) continue
      const v = values[y * width + x]!
      if (v !== v) {
        skipped++
        continue
      }
      count++
      sum += v
      if (v > max) {
        max = v
        maxAt.x = x
        maxAt.y = y
      }
      if (v < min) {
        min = v
        minAt.x = x
        minAt.y = y
      }
    }
  }
  if (count === 0) return null
  return { max, maxAt, min, minAt, mean: sum / count, count, skipped }
}

/** What a whole-grid correction needs, in the units a person types (°C). */
export interface GridCorrection {
  emissivity: number
  reflectedC: number
  /** Atmospheric transmittance, (0, 1]; default 1. */
  transmittance?: number
  /** Air temperature of the path, °C (used with τ < 1); default the reflected temperature. */
  atmosphereC?: number
  band: Band
}

/**
 * Re-corrects a grid of apparent temperatures (°C) to object temperatures (°C) with the engine's correctFrame.
 * Keeps a kelvin copy and the output buffers between calls, so moving an ε slider costs one pass of the frame kernel.
 */
export class GridCorrector {
  private readonly apparentK: Float32Array
  private readonly outK: Float32Array
  private readonly outC: Float32Array

  constructor(readonly apparentC: Float32Array) {
    const n = apparentC.length
    this.apparentK = new Float32Array(n)
    for (let i = 0; i < n; i++) this.apparentK[i] = apparentC[i]! + ZERO_CELSIUS_K
    this.outK = new Float32Array(n)
    this.outC = new Float32Array(n)
  }

  /** Object temperatures, °C (NaN where no object temperature explains the pixel). The returned array is reused. */
  correct(p: GridCorrection): Float32Array {
    correctFrame(this.apparentK, {
      emissivity: p.emissivity,
      reflectedK: p.reflectedC + ZERO_CELSIUS_K,
      transmittance: p.transmittance,
      atmosphereK: p.atmosphereC === undefined ? undefined : p.atmosphereC + ZERO_CELSIUS_K,
      band: p.band,
      out: this.outK,
    })
    const k = this.outK
    const c = this.outC
    for (let i = 0, n = k.length; i < n; i++) c[i] = k[i]! - ZERO_CELSIUS_K
    return c
  }
}

/** Smallest and largest finite value, for the colour scale; null when none is finite. */
export function finiteRange(values: Float32Array): { min: number; max: number } | null {
  let min = Infinity
  let max = -Infinity
  for (let i = 0, n = values.length; i < n; i++) {
    const v = values[i]!
    if (v < min) min = v
    if (v > max) max = v
  }
  return min <= max ? { min, max } : null
}

/** Little-endian Float32 bytes of a grid's values (the stored object's format). */
export function gridToBytes(values: Float32Array): Uint8Array {
  const bytes = new Uint8Array(values.length * 4)
  const view = new DataView(bytes.buffer)
  for (let i = 0; i < values.length; i++) view.setFloat32(4 * i, values[i]!, true)
  return bytes
}

/** Values from little-endian Float32 bytes; throws when the length is not a whole number of values. */
export function gridFromBytes(bytes: Uint8Array): Float32Array {
  if (bytes.byteLength % 4 !== 0) throw new Error('A grid object must hold whole 4-byte values.')
  const n = bytes.byteLength / 4
  const out = new Float32Array(n)
  const view = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength)
  for (let i = 0; i < n; i++) out[i] = view.getFloat32(4 * i, true)
  return out
}
