import { describe, expect, it } from 'vitest'
import {
  bandRadiance,
  bandRadianceDerivative,
  blackbodyFraction,
  exitance,
  planckHeadIntegral,
  planckTailIntegral,
  sigma,
  spectralRadiance,
  temperatureFromRadiance,
  ThermalInputError,
  wienPeakUm,
} from '#shared/thermal'

const LWIR = { fromUm: 8, toUm: 14 }
const MWIR = { fromUm: 3, toUm: 5 }
const rel = (a: number, b: number): number => Math.abs(a / b - 1)

describe('blackbodyFraction F(0→λT)', () => {
  // Brewster, Thermal Radiative Transfer and Properties (1992), reference sheet §5; table given to 4 decimals.
  // The check allows one unit in the 4th decimal: 14 000 µm·K computes to 0.962851, on a rounding boundary.
  it.each([
    [10_000, 0.9142],
    [12_000, 0.9451],
    [14_000, 0.9628],
    [16_000, 0.9738],
    [20_000, 0.9856],
    [30_000, 0.9953],
    [40_000, 0.9979],
  ])('F(%d µm·K) ≈ %f (Brewster 1992, reference sheet §5)', (lt, expected) => {
    expect(Math.abs(blackbodyFraction(lt) - expected)).toBeLessThanOrEqual(1e-4)
  })

  // Incropera Table 12.2 (from memory, reference sheet §5): older c₂, agree to 4×10⁻⁵.
  it.each([
    [2898, 0.250108],
    [3000, 0.273232],
    [4000, 0.480877],
    [5000, 0.633747],
  ])('F(%d µm·K) ≈ %f (Incropera Table 12.2, from memory)', (lt, expected) => {
    expect(Math.abs(blackbodyFraction(lt) - expected)).toBeLessThan(4e-5)
  })

  it('runs from 0 to 1 and increases', () => {
    let prev = 0
    for (let lt = 200; lt <= 200_000; lt *= 1.2) {
      const f = blackbodyFraction(lt)
      expect(f).toBeGreaterThanOrEqual(prev)
      prev = f
    }
    expect(blackbodyFraction(1e7)).toBeCloseTo(1, 9)
    expect(blackbodyFraction(100)).toBeLessThan(1e-20)
  })

  it('the two series agree where they meet (x = 2) and sum to π⁴/15', () => {
    for (const x of [1.5, 1.999, 2, 2.001, 2.5]) {
      expect(planckHeadIntegral(x) + planckTailIntegral(x)).toBeCloseTo(Math.PI ** 4 / 15, 13)
    }
    expect(rel(planckTailIntegral(2 - 1e-12), planckTailIntegral(2 + 1e-12))).toBeLessThan(1e-11)
  })
})

describe('bandRadiance', () => {
  // [C] independent SciPy computation, reference sheet §5 (W·m⁻²·sr⁻¹).
  it.each([
    [250, 22.29229, 0.2170350],
    [300, 54.93346, 1.865956],
    [400, 176.935, 29.84734],
    [800, 1224.233, 2518.116],
  ])('at %d K: 8–14 µm %f, 3–5 µm %f ([C] SciPy, reference sheet §5)', (t, lwir, mwir) => {
    // The sheet prints 7 significant figures, so agreement is checked to half a unit of the last printed digit.
    expect(rel(bandRadiance(t, LWIR), lwir)).toBeLessThan(1e-6)
    expect(rel(bandRadiance(t, MWIR), mwir)).toBeLessThan(1e-6)
  })

  it('σT⁴/π column of reference sheet §5 from integrating over all wavelengths ([C] SciPy)', () => {
    for (const [t, expected] of [[250, 70.5053], [300, 146.1998], [400, 462.0637], [800, 7393.019]] as const) {
      const all = bandRadiance(t, { fromUm: 0.01, toUm: 1e5 })
      expect(rel(all, expected)).toBeLessThan(1e-6)
      expect(rel(Math.PI * all, sigma * t ** 4)).toBeLessThan(1e-7) // CODATA 2018 σ
    }
  })

  it('matches a 20 000-node Simpson integration of spectral radiance to 1e-6 from 150 K to 2500 K, bands within 1–20 µm', () => {
    const simpson = (t: number, a: number, b: number): number => {
      const n = 20_000
      const step = (b - a) / n
      let s = spectralRadiance(a, t) + spectralRadiance(b, t)
      for (let i = 1; i < n; i++) s += (i % 2 ? 4 : 2) * spectralRadiance(a + i * step, t)
      return (s * step) / 3
    }
    for (const band of [{ fromUm: 1, toUm: 20 }, { fromUm: 1, toUm: 2 }, MWIR, { fromUm: 7.5, toUm: 14 }, { fromUm: 14, toUm: 20 }]) {
      for (const t of [150, 300, 700, 1500, 2500]) {
        expect(rel(bandRadiance(t, band), simpson(t, band.fromUm, band.toUm))).toBeLessThan(1e-6)
      }
    }
  })

  it('is additive over adjacent bands', () => {
    for (const t of [150, 320, 1200, 2500]) {
      const whole = bandRadiance(t, { fromUm: 1, toUm: 20 })
      const parts = bandRadiance(t, { fromUm: 1, toUm: 4 }) + bandRadiance(t, { fromUm: 4, toUm: 9 }) + bandRadiance(t, { fromUm: 9, toUm: 20 })
      expect(rel(parts, whole)).toBeLessThan(1e-12)
    }
  })

  it('derivative agrees with a central difference', () => {
    for (const band of [LWIR, MWIR]) {
      for (const t of [150, 300, 1000, 2500]) {
        const d = (bandRadiance(t + 1e-3, band) - bandRadiance(t - 1e-3, band)) / 2e-3
        expect(rel(bandRadianceDerivative(t, band), d)).toBeLessThan(1e-6)
      }
    }
  })

  it('band power-law exponent n = d ln W / d ln T matches reference sheet §3 ([C] SciPy)', () => {
    const n = (t: number, band: typeof LWIR): number => (bandRadianceDerivative(t, band) * t) / bandRadiance(t, band)
    // Within one unit of the sheet's last printed digit: a SciPy re-run gives 2.1647 at 800 K, which the
    // sheet prints as 2.17.
    expect(Math.abs(n(273, LWIR) - 4.95)).toBeLessThan(0.01)
    expect(Math.abs(n(300, LWIR) - 4.58)).toBeLessThan(0.01)
    expect(Math.abs(n(400, LWIR) - 3.6)).toBeLessThan(0.01)
    expect(Math.abs(n(800, LWIR) - 2.17)).toBeLessThan(0.01)
    expect(Math.abs(n(300, MWIR) - 10.9)).toBeLessThan(0.1)
  })

  it('rejects a reversed band and a non-positive temperature with a typed error', () => {
    expect(() => bandRadiance(300, { fromUm: 14, toUm: 8 })).toThrow(ThermalInputError)
    expect(() => bandRadiance(0, LWIR)).toThrow(ThermalInputError)
    expect(() => bandRadiance(-5, LWIR)).toThrow(/absolute zero/)
  })
})

describe('temperatureFromRadiance', () => {
  it('round-trips bandRadiance over 150–2500 K in several bands (property)', () => {
    for (const band of [LWIR, MWIR, { fromUm: 7.5, toUm: 14 }, { fromUm: 1, toUm: 1.7 }, { fromUm: 1, toUm: 20 }]) {
      for (let t = 150; t <= 2500; t += 7.3) {
        expect(Math.abs(temperatureFromRadiance(bandRadiance(t, band), band) - t)).toBeLessThan(1e-9 * t)
      }
    }
  })

  it('throws a typed error for zero, negative or non-finite radiance', () => {
    for (const bad of [0, -1, Number.NaN, Number.POSITIVE_INFINITY]) {
      try {
        temperatureFromRadiance(bad, LWIR)
        expect.unreachable()
      } catch (e) {
        expect(e).toBeInstanceOf(ThermalInputError)
        expect((e as ThermalInputError).code).toBe('invalid-radiance')
      }
    }
  })
})

describe('Wien peak and exitance', () => {
  it.each([
    [300, 9.659],
    [310, 9.348],
    [500, 5.796],
    [800, 3.622],
  ])('Wien peak at %d K is %f µm ([C], reference sheet §5)', (t, um) => {
    expect(wienPeakUm(t)).toBeCloseTo(um, 3)
  })

  it('the Wien peak is where spectral radiance in wavelength is largest', () => {
    for (const t of [300, 800, 2000]) {
      const peak = wienPeakUm(t)
      expect(spectralRadiance(peak, t)).toBeGreaterThan(spectralRadiance(peak * 1.01, t))
      expect(spectralRadiance(peak, t)).toBeGreaterThan(spectralRadiance(peak * 0.99, t))
    }
  })

  it('hotter bodies peak at shorter wavelengths (common practice: Wien)', () => {
    expect(wienPeakUm(1000)).toBeLessThan(wienPeakUm(500))
  })

  it('a room-temperature body emits in the infrared, not the visible (common practice)', () => {
    const visible = bandRadiance(300, { fromUm: 0.38, toUm: 0.75 })
    const infrared = bandRadiance(300, { fromUm: 0.75, toUm: 1000 })
    expect(visible / infrared).toBeLessThan(1e-20)
  })

  it('surfaces emitting 80 %, 50 %, 30 % of a blackbody have ε 0.8, 0.5, 0.3 (common practice)', () => {
    for (const share of [0.8, 0.5, 0.3]) {
      for (const t of [273.15, 300, 600]) {
        expect(exitance(t, share) / exitance(t)).toBeCloseTo(share, 12)
      }
    }
  })

  it('exitance is σT⁴ (Stefan–Boltzmann, CODATA 2018)', () => {
    expect(exitance(300)).toBeCloseTo(5.670374419e-8 * 300 ** 4, 9)
  })
})
