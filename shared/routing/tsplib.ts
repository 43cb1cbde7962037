/**
 * Reader for the TSPLIB format (G. Reinelt, "TSPLIB 95", Universität Heidelberg): symmetric TSP
 * instances with NODE_COORD_SECTION and EUC_2D weights, and TOUR files with TOUR_SECTION.
 */

export interface TsplibPoint {
  x: number
  y: number
}

export interface TsplibInstance {
  name: string
  comment: string
  dimension: number
  edgeWeightType: 'EUC_2D'
  /** Non-standard OPTIMUM header some copies carry; undefined when absent. */
  optimum?: number
  /** Node i of the file (1-based) is coords[i − 1]. */
  coords: TsplibPoint[]
}

/** A malformed or unsupported TSPLIB file; `line` is 1-based, 0 when the fault is not on one line. */
export class TsplibFormatError extends Error {
  constructor(
    message: string,
    readonly line: number,
  ) {
    super(line > 0 ? `TSPLIB line ${line}: ${message}` : `TSPLIB: ${message}`)
    this.name = 'TsplibFormatError'
  }
}

const SECTION_END = /^(EOF|[A-Z_]+_SECTION)\s*$/

/** nint of the TSPLIB 95 text, (int)(x + 0.5), for the non-negative values a distance takes. */
export function nint(x: number): number {
  return Math.floor(x + 0.5)
}

/** EUC_2D weight of TSPLIB 95: nint(√(dx² + dy²)). */
export function euc2d(a: TsplibPoint, b: TsplibPoint): number {
  const dx = a.x - b.x
  const dy = a.y - b.y
  return nint(Math.sqrt(dx * dx + dy * dy))
}

/** Distance function over 0-based node indices of an instance, for planTour and tourLength. */
export function tsplibDistance(instance: TsplibInstance): (i: number, j: number) => number {
  const { coords } = instance
  return (i, j) => euc2d(coords[i]!, coords[j]!)
}

function splitHeader(line: string): [string, string] | undefined {
  const colon = line.indexOf(':')
  if (colon === -1) return undefined
  return [line.slice(0, colon).trim().toUpperCase(), line.slice(colon + 1).trim()]
}

/** Parses a TSP file with EDGE_WEIGHT_TYPE EUC_2D and a NODE_COORD_SECTION. */
export function parseTsplib(text: string): TsplibInstance {
  const lines = text.split(/\r?\n/)
  let name = ''
  const comments: string[] = []
  let dimension = -1
  let weightType = ''
  let optimum: number | undefined
  let coords: (TsplibPoint | undefined)[] | undefined
  let seen = 0

  for (let at = 0; at < lines.length; at++) {
    const line = lines[at]!.trim()
    const lineNo = at + 1
    if (line === '' || line === 'EOF') continue
    if (line.toUpperCase() === 'NODE_COORD_SECTION') {
      if (dimension <= 0) throw new TsplibFormatError('DIMENSION must come before NODE_COORD_SECTION', lineNo)
      if (weightType !== 'EUC_2D') {
        throw new TsplibFormatError(`EDGE_WEIGHT_TYPE ${weightType || '(missing)'} is not supported; only EUC_2D is`, lineNo)
      }
      coords = new Array<TsplibPoint | undefined>(dimension)
      for (at++; at < lines.length; at++) {
        const row = lines[at]!.trim()
        if (row === '') continue
        if (SECTION_END.test(row.toUpperCase())) {
          at--
          break
        }
        const parts = row.split(/\s+/)
        const id = Number(parts[0])
        const x = Number(parts[1])
        const y = Number(parts[2])
        if (parts.length !== 3 || !Number.isFinite(x) || !Number.isFinite(y)) {
          throw new TsplibFormatError(`expected "node x y", got "${row}"`, at + 1)
        }
        if (!(Number.isInteger(id) && id >= 1 && id <= dimension)) {
          throw new TsplibFormatError(`node number ${parts[0]} is outside 1…${dimension}`, at + 1)
        }
        if (coords[id - 1]) throw new TsplibFormatError(`node ${id} appears twice`, at + 1)
        coords[id - 1] = { x, y }
        seen++
      }
      continue
    }
    if (line.toUpperCase().endsWith('_SECTION')) throw new TsplibFormatError(`${line} is not supported`, lineNo)
    const header = splitHeader(line)
    if (!header) throw new TsplibFormatError(`expected "KEY : value", got "${line}"`, lineNo)
    const [key, value] = header
    switch (key) {
      case 'NAME':
        name = value
        break
      case 'COMMENT':
        comments.push(value)
        break
      case 'TYPE':
        if (value.toUpperCase() !== 'TSP') throw new TsplibFormatError(`TYPE ${value} is not supported; only TSP is`, lineNo)
        break
      case 'DIMENSION':
        dimension = Number(value)
        if (!(Number.isInteger(dimension) && dimension > 0)) throw new TsplibFormatError(`DIMENSION must be a whole number > 0, got "${value}"`, lineNo)
        break
      case 'EDGE_WEIGHT_TYPE':
        weightType = value.toUpperCase()
        break
      case 'OPTIMUM':
        optimum = Number(value)
        if (!Number.isFinite(optimum)) throw new TsplibFormatError(`OPTIMUM must be a number, got "${value}"`, lineNo)
        break
      default:
        // Other specification keys (CAPACITY, DISPLAY_DATA_TYPE, …) do not change an EUC_2D TSP.
        break
    }
  }

  if (!coords) throw new TsplibFormatError('NODE_COORD_SECTION is missing', 0)
  if (seen !== dimension) throw new TsplibFormatError(`DIMENSION is ${dimension} but ${seen} nodes were given`, 0)
  return {
    name,
    comment: comments.join(' '),
    dimension,
    edgeWeightType: 'EUC_2D',
    ...(optimum === undefined ? {} : { optimum }),
    coords: coords as TsplibPoint[],
  }
}

/** Parses a TOUR file's TOUR_SECTION (1-based nodes ending in −1) into 0-based indices. */
export function parseTsplibTour(text: string): number[] {
  const lines = text.split(/\r?\n/)
  const start = lines.findIndex((l) => l.trim().toUpperCase() === 'TOUR_SECTION')
  if (start === -1) throw new TsplibFormatError('TOUR_SECTION is missing', 0)
  const tour: number[] = []
  for (let at = start + 1; at < lines.length; at++) {
    for (const token of lines[at]!.trim().split(/\s+/)) {
      if (token === '') continue
      const id = Number(token)
      if (id === -1) return tour
      if (!(Number.isInteger(id) && id >= 1)) throw new TsplibFormatError(`"${token}" is not a node number`, at + 1)
      tour.push(id - 1)
    }
  }
  throw new TsplibFormatError('TOUR_SECTION does not end with -1', 0)
}
