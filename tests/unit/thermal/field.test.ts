import { describe, expect, it } from 'vitest'
import {
  allowedTemperatureAtLoadC,
  loadScaledRise,
  maxDistanceForTargetM,
  pixelsAcross,
  readingWarnings,
  spotSizeMm,
  targetCoversPixels,
  ThermalInputError,
  windFactor,
} from '#shared/thermal'

describe('load scaling', () => {
  it('10 K at 40 % load is 62.5 K at n = 2 and about 43 K at n = 1.6 (reference sheet §2)', () => {
    expect(loadScaledRise(10, 40, 100)).toBeCloseTo(62.5, 10)
    expect(loadScaledRise(10, 40, 100, 1.6)).toBeCloseTo(43.32, 2) // sheet: "43 K"
  })

  it('is the identity at full load and shrinks a rise measured above the reference load', () => {
    expect(loadScaledRise(12, 500, 500, 1.8)).toBeCloseTo(12, 12)
    expect(loadScaledRise(12, 600, 500)).toBeLessThan(12)
  })

  it('rejects a zero load with a typed error', () => {
    expect(() => loadScaledRise(10, 0, 100)).toThrow(ThermalInputError)
  })

  it('allowed temperature at reduced load (reference sheet §1.3, practitioner guidance)', () => {
    // 50 K rated rise, 50 % load, n = 2, 30 °C ambient → 0.25·50 + 30 = 42.5 °C
    expect(allowedTemperatureAtLoadC(50, 50, 100, 30)).toBeCloseTo(42.5, 10)
  })
})

describe('wind factor (estimate, reference sheet §2, from memory)', () => {
  it.each([
    [1, 1.0],
    [2, 1.36],
    [5, 2.06],
    [8, 2.54],
  ])('%d m/s → ×%f', (v, f) => {
    const w = windFactor(v)
    expect(w.factor).toBeCloseTo(f, 10)
    expect(w.estimate).toBe(true)
    expect(w.note).toMatch(/Estimate/)
  })

  it('interpolates between rows, is 1 in still air and follows the fit (v/1 m/s)^0.448 beyond the table', () => {
    expect(windFactor(2.5).factor).toBeCloseTo(1.5, 10)
    expect(windFactor(0).factor).toBe(1)
    const far = windFactor(10)
    expect(far.extrapolated).toBe(true)
    expect(far.factor).toBeCloseTo(10 ** 0.448, 10)
    // the fit stays within 3 % of every table row ([C], reference sheet §2)
    for (const v of [2, 3, 4, 5, 6, 7, 8]) expect(Math.abs(v ** 0.448 / windFactor(v).factor - 1)).toBeLessThan(0.03)
  })
})

describe('spot size and the 3 × 3 rule (common practice)', () => {
  it('one pixel of 1.36 mrad sees 13.6 mm at 10 m', () => {
    expect(spotSizeMm(1.36, 10)).toBeCloseTo(13.6, 10)
  })

  it('a target must cover at least 3 pixels across', () => {
    expect(pixelsAcross(40.8, 1.36, 10)).toBeCloseTo(3, 10)
    expect(targetCoversPixels(40.8, 1.36, 10)).toBe(true)
    expect(targetCoversPixels(40, 1.36, 10)).toBe(false)
    expect(targetCoversPixels(40, 1.36, 10, 2)).toBe(true)
    expect(maxDistanceForTargetM(40.8, 1.36)).toBeCloseTo(10, 10)
  })
})

describe('readingWarnings', () => {
  const codes = (w: ReturnType<typeof readingWarnings>) => w.map((x) => x.code)

  it('flags load below 40 % of rated (NFPA 70B §7.4.5) but not at 40 %', () => {
    expect(codes(readingWarnings({ loadA: 39, ratedA: 100 }))).toContain('load-low')
    expect(codes(readingWarnings({ loadA: 40, ratedA: 100 }))).not.toContain('load-low')
    expect(codes(readingWarnings({}))).toContain('load-not-recorded')
  })

  it('flags ε below 0.5 (reference sheet §3)', () => {
    expect(codes(readingWarnings({ loadA: 1, ratedA: 1, emissivity: 0.45 }))).toEqual(['emissivity-low'])
    expect(codes(readingWarnings({ loadA: 1, ratedA: 1, emissivity: 0.5 }))).toEqual([])
  })

  it('flags a target smaller than 3 × 3 pixels (common practice)', () => {
    const w = readingWarnings({ loadA: 1, ratedA: 1, targetMm: 20, ifovMrad: 1.36, distanceM: 10 })
    expect(codes(w)).toEqual(['target-small'])
    expect(w[0]!.message).toMatch(/1\.5 pixels/)
  })

  it('notes wind above 2.2 m/s and marks above 6.7 m/s as unusable (EPRI 1017693), limits configurable', () => {
    const at = (v: number, lim = {}) => readingWarnings({ loadA: 1, ratedA: 1, windMs: v }, lim)
    expect(at(2)).toEqual([])
    expect(at(3)[0]).toMatchObject({ code: 'wind-elevated', severity: 'info' })
    expect(at(7)[0]).toMatchObject({ code: 'wind-above-limit', severity: 'critical' })
    expect(codes(at(5, { windLimitMs: 4 }))).toEqual(['wind-above-limit'])
  })

  it('flags an instrument past its calibration date', () => {
    expect(codes(readingWarnings({ loadA: 1, ratedA: 1, calibrationDue: '2025-03-01', today: '2025-03-02' }))).toEqual(['calibration-overdue'])
    expect(codes(readingWarnings({ loadA: 1, ratedA: 1, calibrationDue: '2025-03-01', today: '2025-03-01' }))).toEqual([])
    expect(codes(readingWarnings({ loadA: 1, ratedA: 1, calibrationDue: new Date('2025-03-01T00:00:00Z'), today: new Date('2025-06-01T00:00:00Z') }))).toEqual(['calibration-overdue'])
  })

  it('flags an uncertainty interval that crosses a band edge (ANSI/NETA Table 100.18 edges)', () => {
    const crossing = readingWarnings({ loadA: 1, ratedA: 1, riseIntervals: { overAmbientK: { low: 18, high: 23 } } })
    expect(codes(crossing)).toEqual(['interval-crosses-band'])
    expect(crossing[0]!.message).toMatch(/band 3 or band 2/)
    expect(codes(readingWarnings({ loadA: 1, ratedA: 1, riseIntervals: { overAmbientK: { low: 21, high: 39 } } }))).toEqual([])
  })
})
