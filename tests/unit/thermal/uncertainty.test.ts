import { describe, expect, it } from 'vitest'
import { instrumentToleranceK, objectTemperature, objectTemperatureInterval, riseInterval, ThermalInputError } from '#shared/thermal'

const LWIR = { fromUm: 8, toUm: 14 }

describe('objectTemperatureInterval', () => {
  // [C] independent SciPy computation, reference sheet §3: T_app 50 °C, T_refl 20 °C, ε mis-set by ±0.05, 8–14 µm.
  // Sheet values are to 0.1 K. At ε 0.50 a SciPy re-run gives 9.047 K where the sheet prints 9.1, so that row
  // is checked to 0.06 K.
  it.each([
    [0.95, 2.9, 0.05],
    [0.8, 4.0, 0.05],
    [0.6, 6.6, 0.05],
    [0.5, 9.1, 0.06],
    [0.3, 21.7, 0.05],
  ])('spread at ε %f is %f K ([C] SciPy, reference sheet §3)', (eps, spread, tol) => {
    const i = objectTemperatureInterval({ apparentK: 323.15, emissivity: eps, reflectedK: 293.15, band: LWIR }, { emissivity: 0.05 })
    expect(Math.abs(i.high - i.low - spread)).toBeLessThanOrEqual(tol)
  })

  it('contains the nominal value and collapses to it with zero tolerances', () => {
    const input = { apparentK: 340, emissivity: 0.85, reflectedK: 290, band: LWIR }
    const nominal = objectTemperature(input)
    const i = objectTemperatureInterval(input, { emissivity: 0.03, reflectedK: 5, instrument: { absoluteK: 2, relativePct: 2 } })
    expect(i.low).toBeLessThan(nominal)
    expect(i.high).toBeGreaterThan(nominal)
    const z = objectTemperatureInterval(input, {})
    expect(z.low).toBeCloseTo(nominal, 10)
    expect(z.high).toBeCloseTo(nominal, 10)
  })

  it('corners bound a dense grid of the tolerance box (corner evaluation is exact)', () => {
    const input = { apparentK: 330, emissivity: 0.6, reflectedK: 300, band: LWIR }
    const tol = { emissivity: 0.1, reflectedK: 15, instrument: { absoluteK: 2 } }
    const i = objectTemperatureInterval(input, tol)
    let lo = Number.POSITIVE_INFINITY
    let hi = Number.NEGATIVE_INFINITY
    for (let a = -1; a <= 1; a += 0.25)
      for (let b = -1; b <= 1; b += 0.25)
        for (let c = -1; c <= 1; c += 0.25) {
          const t = objectTemperature({ ...input, emissivity: 0.6 + 0.1 * a, reflectedK: 300 + 15 * b, apparentK: 330 + 2 * c })
          lo = Math.min(lo, t)
          hi = Math.max(hi, t)
        }
    expect(i.low).toBeLessThanOrEqual(lo + 1e-9)
    expect(i.high).toBeGreaterThanOrEqual(hi - 1e-9)
    expect(hi - lo).toBeGreaterThan(0.999 * (i.high - i.low)) // the grid includes the corners
  })

  it('instrument accuracy is the larger of ±K and ±% of the reading in °C (as imagers state it)', () => {
    expect(instrumentToleranceK(273.15 + 50, { absoluteK: 2, relativePct: 2 })).toBeCloseTo(2, 12)
    expect(instrumentToleranceK(273.15 + 250, { absoluteK: 2, relativePct: 2 })).toBeCloseTo(5, 12)
    expect(instrumentToleranceK(273.15 - 50, { absoluteK: 2, relativePct: 2 })).toBeCloseTo(2, 12)
    const input = { apparentK: 273.15 + 250, emissivity: 1, reflectedK: 293.15, band: LWIR }
    const i = objectTemperatureInterval(input, { instrument: { absoluteK: 2, relativePct: 2 } })
    expect(i.high - i.low).toBeCloseTo(10, 6)
  })

  it('throws a typed error when the tolerances let the reflection outshine the target', () => {
    const input = { apparentK: 300, emissivity: 0.15, reflectedK: 310, band: LWIR }
    expect(() => objectTemperatureInterval(input, { emissivity: 0.1, reflectedK: 10 })).toThrow(ThermalInputError)
  })
})

describe('riseInterval (hot spot and reference in the same image)', () => {
  it('contains the nominal rise and bounds a dense grid of shared errors', () => {
    const hot = { apparentK: 360, emissivity: 0.8, reflectedK: 295, band: LWIR }
    const ref = { ...hot, apparentK: 320 }
    const tol = { emissivity: 0.05, reflectedK: 10, instrument: { absoluteK: 2, relativePct: 2 } }
    const i = riseInterval(hot, ref, tol)
    const nominal = objectTemperature(hot) - objectTemperature(ref)
    expect(i.low).toBeLessThan(nominal)
    expect(i.high).toBeGreaterThan(nominal)
    for (let a = -1; a <= 1; a += 0.5)
      for (let b = -1; b <= 1; b += 0.5)
        for (let c = -1; c <= 1; c += 0.5) {
          const shift = (k: number): number => c * Math.max(2, 0.02 * Math.abs(k - 273.15))
          const over = { emissivity: 0.8 + 0.05 * a, reflectedK: 295 + 10 * b }
          const rise = objectTemperature({ ...hot, ...over, apparentK: 360 + shift(360) }) - objectTemperature({ ...ref, ...over, apparentK: 320 + shift(320) })
          expect(rise).toBeGreaterThanOrEqual(i.low - 1e-6)
          expect(rise).toBeLessThanOrEqual(i.high + 1e-6)
        }
  })

  it('is narrower than the difference of independent intervals (shared offset cancels)', () => {
    const hot = { apparentK: 360, emissivity: 0.9, reflectedK: 295, band: LWIR }
    const ref = { ...hot, apparentK: 330 }
    const tol = { instrument: { absoluteK: 2 } }
    const rise = riseInterval(hot, ref, tol)
    const h = objectTemperatureInterval(hot, tol)
    const r = objectTemperatureInterval(ref, tol)
    expect(rise.high - rise.low).toBeLessThan(h.high - r.low - (h.low - r.high))
  })
})
