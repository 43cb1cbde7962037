import { describe, expect, it } from 'vitest'
import { c, c1, c1L, c2, h, kB, sigma, wienB } from '#shared/thermal'

describe('physical constants', () => {
  it('match CODATA 2018 exact and recommended values', () => {
    expect(h).toBe(6.62607015e-34) // CODATA 2018 (exact)
    expect(c).toBe(299792458) // CODATA 2018 (exact)
    expect(kB).toBe(1.380649e-23) // CODATA 2018 (exact)
    expect(sigma).toBe(5.670374419e-8) // CODATA 2018
    expect(wienB).toBe(2.897771955e-3) // CODATA 2018
  })

  it('derives the radiation constants consistently with CODATA 2018', () => {
    expect(c1L).toBeCloseTo(1.191042972e-16, 25) // CODATA 2018: c1L = 2hc²
    expect(Math.abs(c1L / 1.191042972e-16 - 1)).toBeLessThan(1e-9) // CODATA 2018
    expect(Math.abs(c1 / 3.741771852e-16 - 1)).toBeLessThan(1e-9) // CODATA 2018: c1 = 2πhc²
    expect(Math.abs(c2 / 1.438776877e-2 - 1)).toBeLessThan(1e-9) // CODATA 2018: c2 = hc/k
  })

  it('σ from h, c and k agrees with the CODATA 2018 value', () => {
    const fromExact = (2 * Math.PI ** 5 * kB ** 4) / (15 * h ** 3 * c ** 2)
    expect(Math.abs(fromExact / sigma - 1)).toBeLessThan(1e-9) // CODATA 2018
  })
})
