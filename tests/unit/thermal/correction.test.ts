import { describe, expect, it } from 'vitest'
import {
  bandRadiance,
  objectTemperature,
  objectTemperatureSigma,
  ThermalInputError,
  temperatureFromRadiance,
  type CorrectionInput,
} from '#shared/thermal'

const LWIR = { fromUm: 8, toUm: 14 }
const MWIR = { fromUm: 3, toUm: 5 }
const K = (c: number): number => c + 273.15
const C = (k: number): number => k - 273.15

describe('objectTemperature against reference sheet §5', () => {
  // [C] independent SciPy computation, reference sheet §5: 8–14 µm, τ = 1; values to 0.001 °C.
  it.each([
    [50, 0.95, 20, 51.392, 51.364],
    [50, 0.5, 20, 74.34, 73.407],
    [50, 0.1, 20, 203.88, 181.11],
    [30, 0.6, -40, 59.045, 58.554],
    [20, 0.95, 20, 20.0, 20.0],
  ])('T_app %f °C, ε %f, T_refl %f °C → %f °C band, %f °C σT⁴ ([C] SciPy, reference sheet §5)', (app, eps, refl, band, shortcut) => {
    const input = { apparentK: K(app), emissivity: eps, reflectedK: K(refl), band: LWIR }
    expect(Math.abs(C(objectTemperature(input)) - band)).toBeLessThan(6e-4)
    expect(Math.abs(C(objectTemperatureSigma(input)) - shortcut)).toBeLessThan(6e-4)
  })

  it.each([
    [0.95, 65.712],
    [0.85, 70.189],
  ])('with τ %f and T_atm 20 °C: T_app 60 °C, ε 0.9, T_refl 20 °C → %f °C ([C] SciPy, reference sheet §5)', (tau, expected) => {
    const t = objectTemperature({ apparentK: K(60), emissivity: 0.9, reflectedK: K(20), transmittance: tau, atmosphereK: K(20), band: LWIR })
    expect(Math.abs(C(t) - expected)).toBeLessThan(6e-4)
  })

  it.each([
    [0.9, 52.208],
    [0.5, 66.525],
  ])('MWIR 3–5 µm, T_app 50 °C, T_refl 20 °C, ε %f → %f °C ([C] SciPy, reference sheet §5)', (eps, expected) => {
    const t = objectTemperature({ apparentK: K(50), emissivity: eps, reflectedK: K(20), band: MWIR })
    expect(Math.abs(C(t) - expected)).toBeLessThan(6e-4)
  })

  it('the σT⁴ shortcut errs by about −0.9 K at ε 0.5 and −22.8 K at ε 0.1 ([C], reference sheet §3)', () => {
    const diff = (eps: number): number => {
      const input = { apparentK: K(50), emissivity: eps, reflectedK: K(20), band: LWIR }
      return objectTemperatureSigma(input) - objectTemperature(input)
    }
    expect(diff(0.5)).toBeCloseTo(-0.93, 1)
    expect(diff(0.1)).toBeCloseTo(-22.77, 1)
  })
})

describe('objectTemperature properties', () => {
  it('is the identity when ε = 1 and τ = 1, whatever the reflected temperature', () => {
    for (const band of [LWIR, MWIR]) {
      for (let t = 200; t <= 1500; t += 37) {
        for (const refl of [230, 293.15, 600]) {
          expect(objectTemperature({ apparentK: t, emissivity: 1, reflectedK: refl, band })).toBeCloseTo(t, 8)
        }
      }
    }
  })

  it('is the identity when the object is at the reflected (and air) temperature, for any ε and τ', () => {
    for (const eps of [0.2, 0.6, 0.95]) {
      for (const tau of [0.7, 1]) {
        expect(objectTemperature({ apparentK: 300, emissivity: eps, reflectedK: 300, transmittance: tau, band: LWIR })).toBeCloseTo(300, 8)
      }
    }
  })

  it('falls as ε rises when the target is hotter than its reflection, and rises when colder (monotonic)', () => {
    let prevHot = Number.POSITIVE_INFINITY
    let prevCold = 0
    for (let eps = 0.2; eps <= 1.0001; eps += 0.05) {
      const hot = objectTemperature({ apparentK: 350, emissivity: Math.min(eps, 1), reflectedK: 293.15, band: LWIR })
      const cold = objectTemperature({ apparentK: 280, emissivity: Math.min(eps, 1), reflectedK: 293.15, band: LWIR })
      expect(hot).toBeLessThan(prevHot)
      expect(cold).toBeGreaterThan(prevCold)
      prevHot = hot
      prevCold = cold
    }
  })

  it('reproduces the object temperature from a forward-simulated reading (round trip with window and atmosphere)', () => {
    const band = { fromUm: 7.5, toUm: 14 }
    for (const tObj of [250, 330, 420, 900]) {
      const eps = 0.7
      const tau = 0.9
      const refl = 285
      const atm = 295
      const win = { transmittance: 0.6, tempK: 300 }
      const scene = eps * tau * bandRadiance(tObj, band) + (1 - eps) * tau * bandRadiance(refl, band) + (1 - tau) * bandRadiance(atm, band)
      const atImager = win.transmittance * scene + (1 - win.transmittance) * bandRadiance(win.tempK, band)
      const apparentK = temperatureFromRadiance(atImager, band)
      const input: CorrectionInput = { apparentK, emissivity: eps, reflectedK: refl, transmittance: tau, atmosphereK: atm, window: win, band }
      expect(objectTemperature(input)).toBeCloseTo(tObj, 7)
    }
  })

  it('a window of transmittance 1 changes nothing', () => {
    const base = { apparentK: 340, emissivity: 0.8, reflectedK: 290, band: LWIR }
    expect(objectTemperature({ ...base, window: { transmittance: 1, tempK: 500 } })).toBeCloseTo(objectTemperature(base), 10)
  })
})

describe('objectTemperature errors', () => {
  const base = { apparentK: K(30), emissivity: 0.9, reflectedK: K(20), band: LWIR }
  const codeOf = (input: CorrectionInput): string => {
    try {
      objectTemperature(input)
    } catch (e) {
      expect(e).toBeInstanceOf(ThermalInputError)
      return (e as ThermalInputError).code
    }
    return 'no error'
  }

  it('throws a typed error, not NaN, when the reflected source outshines the target', () => {
    const input = { apparentK: K(20), emissivity: 0.1, reflectedK: K(150), band: LWIR }
    expect(codeOf(input)).toBe('reflection-outshines-target')
    expect(() => objectTemperature(input)).toThrow(/outshines/)
    expect(() => objectTemperatureSigma(input)).toThrow(ThermalInputError)
  })

  it('rejects ε and τ outside (0, 1] and temperatures at or below 0 K', () => {
    expect(codeOf({ ...base, emissivity: 0 })).toBe('invalid-emissivity')
    expect(codeOf({ ...base, emissivity: 1.01 })).toBe('invalid-emissivity')
    expect(codeOf({ ...base, transmittance: 0 })).toBe('invalid-transmittance')
    expect(codeOf({ ...base, transmittance: 1.2 })).toBe('invalid-transmittance')
    expect(codeOf({ ...base, window: { transmittance: 0, tempK: 300 } })).toBe('invalid-transmittance')
    expect(codeOf({ ...base, apparentK: 0 })).toBe('invalid-temperature')
    expect(codeOf({ ...base, reflectedK: -3 })).toBe('invalid-temperature')
    expect(codeOf({ ...base, atmosphereK: Number.NaN })).toBe('invalid-temperature')
    expect(codeOf({ ...base, band: { fromUm: 5, toUm: 5 } })).toBe('invalid-band')
  })

  it('names the offending field', () => {
    try {
      objectTemperature({ ...base, emissivity: 2 })
    } catch (e) {
      expect((e as ThermalInputError).field).toBe('emissivity')
    }
  })
})
