import { c1L, c2, c2UmK, sigma, wienB } from './constants'
import { ThermalInputError } from './errors'

/** A spectral band in micrometres, fromUm < toUm. */
export interface Band {
  fromUm: number
  toUm: number
}

/** ∫₀^∞ x³/(eˣ−1) dx = π⁴/15. */
const TOTAL_INTEGRAL = Math.PI ** 4 / 15
/** Below this x the power series converges fast; above it the exponential series does. */
const SERIES_SWITCH = 2
/** Radiance per unit of the dimensionless integral at T = 1 K: c₁L/c₂⁴. */
const RADIANCE_SCALE = c1L / c2 ** 4

// Coefficients B₂ₘ/(2m)! of t/(eᵗ−1) = Σ Bₙ tⁿ/n!, from B₂ₘ/(2m)! = (−1)^(m+1)·2ζ(2m)/(2π)^(2m).
// Computing them from ζ avoids a hand-typed table of large Bernoulli fractions.
const EVEN_COEFFS: number[] = (() => {
  const out: number[] = []
  for (let m = 1; m <= 24; m++) {
    let zeta: number
    if (m === 1) zeta = Math.PI ** 2 / 6
    else if (m === 2) zeta = Math.PI ** 4 / 90
    else {
      zeta = 0
      for (let k = 2000; k >= 1; k--) zeta += k ** (-2 * m)
    }
    out.push(((m % 2 === 1 ? 1 : -1) * 2 * zeta) / (2 * Math.PI) ** (2 * m))
  }
  return out
})()

/** ∫₀^x t³/(eᵗ−1) dt by the Bernoulli power series (radius 2π; used for x < 2). */
function lowerIntegral(x: number): number {
  const x2 = x * x
  const x3 = x2 * x
  let sum = x3 / 3 - (x3 * x) / 8
  let pow = x3 * x2 // x^(2m+3) for m = 1
  for (let m = 1; m <= EVEN_COEFFS.length; m++) {
    const term = (EVEN_COEFFS[m - 1]! * pow) / (2 * m + 3)
    sum += term
    if (Math.abs(term) < 1e-18 * sum) break
    pow *= x2
  }
  return sum
}

/** ∫ₓ^∞ t³/(eᵗ−1) dt = Σₖ e^(−kx)(x³/k + 3x²/k² + 6x/k³ + 6/k⁴) (used for x ≥ 2). */
function upperIntegral(x: number): number {
  const e = Math.exp(-x)
  const x2 = x * x
  const x3 = x2 * x
  let ek = e
  let sum = 0
  for (let k = 1; k <= 200; k++) {
    const ik = 1 / k
    const term = ek * ik * (x3 + ik * (3 * x2 + ik * (6 * x + 6 * ik)))
    sum += term
    if (term < 1e-18 * sum) break
    ek *= e
  }
  return sum
}

/** ∫ₐᵇ t³/(eᵗ−1) dt for 0 < a ≤ b, choosing the series so that no digits cancel needlessly. */
function planckIntegral(a: number, b: number): number {
  if (b < SERIES_SWITCH) return lowerIntegral(b) - lowerIntegral(a)
  if (a >= SERIES_SWITCH) return upperIntegral(a) - upperIntegral(b)
  return TOTAL_INTEGRAL - lowerIntegral(a) - upperIntegral(b)
}

/** ∫ₓ^∞ t³/(eᵗ−1) dt for any x > 0 (exported for the series cross-check in tests). */
export function planckTailIntegral(x: number): number {
  return x >= SERIES_SWITCH ? upperIntegral(x) : TOTAL_INTEGRAL - lowerIntegral(x)
}

/** ∫₀^x t³/(eᵗ−1) dt for any x > 0 (exported for the series cross-check in tests). */
export function planckHeadIntegral(x: number): number {
  return x < SERIES_SWITCH ? lowerIntegral(x) : TOTAL_INTEGRAL - upperIntegral(x)
}

/** Throws unless the band is two positive, finite wavelengths in increasing order. */
export function assertBand(band: Band): void {
  const ok =
    band != null &&
    Number.isFinite(band.fromUm) &&
    Number.isFinite(band.toUm) &&
    band.fromUm > 0 &&
    band.toUm > band.fromUm
  if (!ok) {
    throw new ThermalInputError(
      'invalid-band',
      'The imager band must be two positive wavelengths in µm, the first shorter than the second.',
      'band',
    )
  }
}

function assertTemperature(tempK: number, field = 'temperature'): void {
  if (!Number.isFinite(tempK) || tempK <= 0) {
    throw new ThermalInputError('invalid-temperature', 'Temperatures must be above absolute zero (0 K).', field)
  }
}

/** Blackbody spectral radiance at one wavelength, W·m⁻²·sr⁻¹·µm⁻¹. */
export function spectralRadiance(wavelengthUm: number, tempK: number): number {
  const lambda = wavelengthUm * 1e-6
  const x = c2 / (lambda * tempK)
  // ×1e-6 turns per-metre into per-micrometre.
  return (c1L / lambda ** 5 / Math.expm1(x)) * 1e-6
}

/** Blackbody radiance integrated over the band, W·m⁻²·sr⁻¹ (Planck's law, CODATA 2018). */
export function bandRadiance(tempK: number, band: Band): number {
  assertTemperature(tempK)
  assertBand(band)
  return bandRadianceUnchecked(tempK, band.fromUm, band.toUm)
}

/** bandRadiance without input checks, for inner loops that have validated once. */
export function bandRadianceUnchecked(tempK: number, fromUm: number, toUm: number): number {
  const xShort = c2UmK / (fromUm * tempK)
  const xLong = c2UmK / (toUm * tempK)
  const t2 = tempK * tempK
  return RADIANCE_SCALE * t2 * t2 * planckIntegral(xLong, xShort)
}

/** dW/dT of the band radiance, W·m⁻²·sr⁻¹·K⁻¹, in closed form from the integral's limits. */
export function bandRadianceDerivative(tempK: number, band: Band): number {
  assertTemperature(tempK)
  assertBand(band)
  return bandRadianceDerivativeUnchecked(tempK, band.fromUm, band.toUm)
}

/** bandRadianceDerivative without input checks. */
export function bandRadianceDerivativeUnchecked(tempK: number, fromUm: number, toUm: number): number {
  // W = C·T⁴·∫[x_l, x_s] f with x = c₂/(λT), so dW/dT = 4W/T − C·T³·(x_s f(x_s) − x_l f(x_l)).
  const xs = c2UmK / (fromUm * tempK)
  const xl = c2UmK / (toUm * tempK)
  const t3 = tempK * tempK * tempK
  const w = RADIANCE_SCALE * t3 * tempK * planckIntegral(xl, xs)
  const fs = (xs * xs * xs * xs) / Math.expm1(xs)
  const fl = (xl * xl * xl * xl) / Math.expm1(xl)
  return (4 * w) / tempK - RADIANCE_SCALE * t3 * (fs - fl)
}

/** Fraction of blackbody emission below λT, F(0→λT), with λT in µm·K. */
export function blackbodyFraction(lambdaT_umK: number): number {
  if (!Number.isFinite(lambdaT_umK) || lambdaT_umK <= 0) return 0
  return planckTailIntegral(c2UmK / lambdaT_umK) / TOTAL_INTEGRAL
}

/** Wavelength of peak spectral exitance (Wien's displacement law), µm. */
export function wienPeakUm(tempK: number): number {
  assertTemperature(tempK)
  return (wienB / tempK) * 1e6
}

/** Total hemispherical exitance εσT⁴ (Stefan–Boltzmann), W·m⁻². */
export function exitance(tempK: number, emissivity = 1): number {
  assertTemperature(tempK)
  return emissivity * sigma * tempK ** 4
}

/** Lowest and highest temperatures the inverse searches, K; outside them band radiances under- or overflow. */
export const INVERSE_RANGE_K = { min: 30, max: 50_000 } as const

/** Temperature of a blackbody whose band radiance equals `radiance` (W·m⁻²·sr⁻¹), K. */
export function temperatureFromRadiance(radiance: number, band: Band): number {
  assertBand(band)
  if (!Number.isFinite(radiance) || radiance <= 0) {
    throw new ThermalInputError(
      'invalid-radiance',
      'A radiance must be a positive number; zero or less has no temperature.',
      'radiance',
    )
  }
  return invertRadiance(radiance, band.fromUm, band.toUm)
}

/** Safeguarded Newton on ln W against ln T, kept inside a shrinking bracket (falls back to bisection). */
export function invertRadiance(radiance: number, fromUm: number, toUm: number, guessK = 300): number {
  let lo: number = INVERSE_RANGE_K.min
  let hi: number = INVERSE_RANGE_K.max
  const target = Math.log(radiance)
  if (radiance < bandRadianceUnchecked(lo, fromUm, toUm) || radiance > bandRadianceUnchecked(hi, fromUm, toUm)) {
    throw new ThermalInputError(
      'radiance-out-of-range',
      `That radiance lies outside what a body between ${lo} K and ${hi} K emits in this band.`,
      'radiance',
    )
  }
  let t = Math.min(Math.max(guessK, lo * 1.001), hi * 0.999)
  for (let i = 0; i < 200; i++) {
    const w = bandRadianceUnchecked(t, fromUm, toUm)
    const g = Math.log(w) - target
    if (g === 0) return t
    if (g > 0) hi = t
    else lo = t
    // n = d ln W / d ln T is the local power law; a Newton step in log space is exact for a pure power law.
    const n = (bandRadianceDerivativeUnchecked(t, fromUm, toUm) * t) / w
    let next = t * Math.exp(-g / n)
    if (!(next > lo && next < hi)) next = Math.sqrt(lo * hi)
    if (Math.abs(next - t) <= 1e-13 * t) return next
    t = next
  }
  return t
}
