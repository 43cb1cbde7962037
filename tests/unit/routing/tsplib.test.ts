import { readFileSync } from 'node:fs'
import { describe, expect, it } from 'vitest'
import { tourLength } from '#shared/routing'
import { euc2d, nint, parseTsplib, parseTsplibTour, tsplibDistance, TsplibFormatError } from '#shared/routing/tsplib'

const fixture = (name: string) => readFileSync(new URL(`./fixtures/${name}.tsp`, import.meta.url), 'utf8')

// TSPLIB 95 optimal tour files berlin52.opt.tour and st70.opt.tour (published with the library),
// as copied in public repositories; listed in TOUR format to exercise the tour reader too.
const BERLIN52_OPT_TOUR = `NAME : berlin52.opt.tour
TYPE : TOUR
DIMENSION : 52
TOUR_SECTION
1 49 32 45 19 41 8 9 10 43 33 51 11 52 14 13 47 26 27 28 12 25 4 6 15 5 24 48 38 37 40 39 36 35 34 44
46 16 29 50 20 23 30 2 7 42 21 17 3 18 31 22
-1
EOF`
const ST70_OPT_TOUR = `NAME : st70.opt.tour
COMMENT : Optimal tour for st70 (675)
TYPE : TOUR
DIMENSION : 70
TOUR_SECTION
1 36 29 13 70 35 31 69 38 59 22 66 63 57 15 24 19 7 2 4 18 42 32 3 8 26 55 49 28 14 20 30 44 68 27 46
25 45 39 61 40 9 17 43 41 6 53 5 10 52 60 12 34 21 33 62 54 48 67 11 64 65 56 51 50 58 37 47 16 23
-1
EOF`

describe('EUC_2D distance', () => {
  it('rounds the Euclidean distance to the nearest integer, halves up', () => {
    // TSPLIB 95 §2.1: d = nint(sqrt(xd² + yd²)), nint(x) = (int)(x + 0.5).
    expect(euc2d({ x: 0, y: 0 }, { x: 3, y: 4 })).toBe(5)
    expect(euc2d({ x: 0, y: 0 }, { x: 1, y: 1 })).toBe(1) // √2 = 1.414…
    expect(euc2d({ x: 0, y: 0 }, { x: 1, y: 2 })).toBe(2) // √5 = 2.236…
    expect(euc2d({ x: 0, y: 0 }, { x: 2, y: 2 })).toBe(3) // √8 = 2.828…
    expect(euc2d({ x: 1, y: 1 }, { x: 1, y: 3.5 })).toBe(3) // 2.5 rounds up
    expect(nint(2.4999)).toBe(2)
  })
})

describe('parseTsplib', () => {
  it('reads the header and every node of the three instances', () => {
    const berlin = parseTsplib(fixture('berlin52'))
    expect(berlin).toMatchObject({ name: 'berlin52', dimension: 52, edgeWeightType: 'EUC_2D' })
    expect(berlin.coords).toHaveLength(52)
    // First and last nodes as printed in berlin52.tsp.
    expect(berlin.coords[0]).toEqual({ x: 565, y: 575 })
    expect(berlin.coords[51]).toEqual({ x: 1740, y: 245 })
    expect(parseTsplib(fixture('eil51')).coords).toHaveLength(51)
    const st70 = parseTsplib(fixture('st70'))
    expect(st70.coords).toHaveLength(70)
    expect(st70.coords[69]).toEqual({ x: 84, y: 94 })
  })

  it('gives the published optimal tours their published lengths', () => {
    const berlin = parseTsplib(fixture('berlin52'))
    const berlinTour = parseTsplibTour(BERLIN52_OPT_TOUR)
    expect(new Set(berlinTour).size).toBe(52)
    expect(tourLength(berlinTour, tsplibDistance(berlin))).toBe(7542) // TSPLIB published optimum
    const st70 = parseTsplib(fixture('st70'))
    const st70Tour = parseTsplibTour(ST70_OPT_TOUR)
    expect(new Set(st70Tour).size).toBe(70)
    expect(tourLength(st70Tour, tsplibDistance(st70))).toBe(675) // TSPLIB published optimum
  })

  it('accepts "KEY: value" without a space and CRLF line ends', () => {
    const text = 'NAME: tiny\r\nTYPE: TSP\r\nDIMENSION: 3\r\nEDGE_WEIGHT_TYPE: EUC_2D\r\nNODE_COORD_SECTION\r\n1 0 0\r\n3 0 4\r\n2 3 0\r\nEOF\r\n'
    const tiny = parseTsplib(text)
    expect(tiny.coords).toEqual([{ x: 0, y: 0 }, { x: 3, y: 0 }, { x: 0, y: 4 }])
    expect(tourLength([0, 1, 2], tsplibDistance(tiny))).toBe(12)
  })

  it('refuses what it cannot read, naming the line', () => {
    const base = 'NAME : bad\nTYPE : TSP\nDIMENSION : 2\nEDGE_WEIGHT_TYPE : EUC_2D\nNODE_COORD_SECTION\n'
    expect(() => parseTsplib(base.replace('EUC_2D', 'GEO') + '1 0 0\n2 1 1\nEOF')).toThrow(/GEO is not supported/)
    expect(() => parseTsplib(base + '1 0 0\nEOF')).toThrow(/DIMENSION is 2 but 1 nodes/)
    expect(() => parseTsplib(base + '1 0 0\n1 1 1\nEOF')).toThrow(/line 7: node 1 appears twice/)
    expect(() => parseTsplib(base + '1 0 0\n3 1 1\nEOF')).toThrow(/outside 1…2/)
    expect(() => parseTsplib(base + '1 0 zero\n2 1 1\nEOF')).toThrow(TsplibFormatError)
    expect(() => parseTsplib('NAME : x\nTYPE : ATSP\n')).toThrow(/TYPE ATSP/)
    expect(() => parseTsplibTour('TOUR_SECTION\n1\n2\n')).toThrow(/-1/)
  })
})
