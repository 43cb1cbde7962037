import { describe, expect, it } from 'vitest'
import { COLOUR_MAPS, colourMapLut, colourMapTable, valuesToRgba } from '#shared/thermal/colormaps'

// Endpoints and midpoints from matplotlib's listed colour maps (lib/matplotlib/_cm_listed.py, CC0), entries 0, 128 and 255,
// and the hex stops those tables are usually quoted with (viridis #440154 … #fde725, inferno #000004 … #fcffa4,
// cividis #00224e … #fee838, the last from Nuñez, Anderton & Renslow 2018 as shipped by matplotlib).
const PUBLISHED = {
  inferno: { first: [0.001462, 0.000466, 0.013866], mid: [0.735683, 0.215906, 0.330245], last: [0.988362, 0.998364, 0.644924], hex: ['#000004', '#fcffa4'] },
  viridis: { first: [0.267004, 0.004874, 0.329415], mid: [0.127568, 0.566949, 0.550556], last: [0.993248, 0.906157, 0.143936], hex: ['#440154', '#fde725'] },
  cividis: { first: [0.0, 0.135112, 0.304751], mid: [0.488697, 0.485318, 0.471008], last: [0.995737, 0.909344, 0.217772], hex: ['#00224e', '#fee838'] },
} as const

const hexOf = (lut: Uint8Array, i: number) => `#${[0, 1, 2].map((c) => lut[4 * i + c]!.toString(16).padStart(2, '0')).join('')}`

describe('colour map tables', () => {
  it.each(COLOUR_MAPS)('%s has 256 rows matching the published entries 0, 128 and 255', (name) => {
    const t = colourMapTable(name)
    expect(t).toHaveLength(256)
    expect(t[0]).toEqual(PUBLISHED[name].first)
    expect(t[128]).toEqual(PUBLISHED[name].mid)
    expect(t[255]).toEqual(PUBLISHED[name].last)
  })

  it.each(COLOUR_MAPS)('%s bytes give the usual hex endpoints', (name) => {
    const lut = colourMapLut(name)
    expect(hexOf(lut, 0)).toBe(PUBLISHED[name].hex[0])
    expect(hexOf(lut, 255)).toBe(PUBLISHED[name].hex[1])
  })

  it.each(COLOUR_MAPS)('%s gets lighter from end to end (perceptually ordered maps rise in lightness; common practice: Rec. 709 luma)', (name) => {
    const lut = colourMapLut(name)
    const luma = (i: number) => 0.2126 * lut[4 * i]! + 0.7152 * lut[4 * i + 1]! + 0.0722 * lut[4 * i + 2]!
    for (let i = 16; i < 256; i += 16) expect(luma(i)).toBeGreaterThan(luma(i - 16))
  })
})

describe('valuesToRgba', () => {
  it('puts min on entry 0, max on entry 255, halfway on entry 128 (rounded), clamps outside, greys NaN', () => {
    const lut = colourMapLut('viridis')
    const rgba = valuesToRgba(new Float32Array([10, 30, 20, -5, 99, Number.NaN]), 10, 30, 'viridis')
    const px = (i: number) => Array.from(rgba.subarray(4 * i, 4 * i + 4))
    const entry = (k: number) => Array.from(lut.subarray(4 * k, 4 * k + 4))
    expect(px(0)).toEqual(entry(0))
    expect(px(1)).toEqual(entry(255))
    // (20 − 10) / 20 × 255 = 127.5 → 128
    expect(px(2)).toEqual(entry(128))
    expect(px(3)).toEqual(entry(0))
    expect(px(4)).toEqual(entry(255))
    expect(px(5)).toEqual([128, 128, 128, 255])
  })

  it('draws a flat grid (min = max) with entry 0 and reuses the output buffer', () => {
    const out = new Uint8ClampedArray(8)
    const rgba = valuesToRgba(new Float32Array([5, 5]), 5, 5, 'inferno', out)
    expect(rgba).toBe(out)
    expect(Array.from(rgba.subarray(0, 4))).toEqual(Array.from(colourMapLut('inferno').subarray(0, 4)))
  })

  it('does not wrap for a value far beyond a tiny span', () => {
    const rgba = valuesToRgba(new Float32Array([2000]), 0, 1e-6, 'cividis')
    expect(Array.from(rgba.subarray(0, 4))).toEqual(Array.from(colourMapLut('cividis').subarray(4 * 255, 4 * 256)))
  })
})
