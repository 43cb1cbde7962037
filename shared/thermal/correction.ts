import { ThermalInputError } from './errors'
import { type Band, assertBand, bandRadianceUnchecked, invertRadiance } from './planck'

/** An infrared window (or any protective optic) between the imager and the scene. */
export interface WindowParams {
  /** Transmittance of the window in the imager's band, (0, 1]. */
  transmittance: number
  /** Window temperature, K. */
  tempK: number
}

/** What is needed to turn an apparent temperature into an object temperature. */
export interface CorrectionInput {
  /** The imager's reading at ε = 1, τ = 1, K. */
  apparentK: number
  /** Emissivity of the target surface in the band, (0, 1]. */
  emissivity: number
  /** Reflected apparent temperature (ASTM E1862), K. */
  reflectedK: number
  /** Atmospheric transmittance of the path, (0, 1]; default 1. */
  transmittance?: number
  /** Air temperature of the path, K; default the reflected temperature. */
  atmosphereK?: number
  /** IR window in front of the imager, if any. */
  window?: WindowParams
  /** The imager's spectral band. */
  band: Band
}

/** The measurement equation's terms, reduced to W_obj = (W_app·α + β)/ε + W_refl. */
export interface MeasurementTerms {
  alpha: number
  beta: number
  reflectedRadiance: number
}

function fail(code: ConstructorParameters<typeof ThermalInputError>[0], message: string, field: string): never {
  throw new ThermalInputError(code, message, field)
}

function checkTemperature(value: number | undefined, field: string, label: string): void {
  if (value === undefined) return
  if (!Number.isFinite(value) || value <= 0) {
    fail('invalid-temperature', `${label} must be above absolute zero.`, field)
  }
}

function checkFraction(value: number | undefined, field: string, code: 'invalid-emissivity' | 'invalid-transmittance', label: string): void {
  if (value === undefined) return
  if (!Number.isFinite(value) || value <= 0 || value > 1) {
    fail(code, `${label} must be greater than 0 and at most 1.`, field)
  }
}

/** Throws a ThermalInputError naming the first input that is out of range. */
export function validateCorrectionInput(input: CorrectionInput): void {
  assertBand(input.band)
  checkTemperature(input.apparentK, 'apparentK', 'The apparent temperature')
  checkTemperature(input.reflectedK, 'reflectedK', 'The reflected temperature')
  checkTemperature(input.atmosphereK, 'atmosphereK', 'The air temperature')
  checkFraction(input.emissivity, 'emissivity', 'invalid-emissivity', 'Emissivity')
  checkFraction(input.transmittance, 'transmittance', 'invalid-transmittance', 'Atmospheric transmittance')
  if (input.window) {
    checkFraction(input.window.transmittance, 'window.transmittance', 'invalid-transmittance', 'Window transmittance')
    checkTemperature(input.window.tempK, 'window.tempK', 'The window temperature')
  }
}

/**
 * Coefficients of the measurement equation for a band, so one pixel costs a multiply-add.
 *
 * Model (radiances W integrated over the band):
 *   at the imager:  W(T_app) = τw·W_scene + (1−τw)·W(T_w)   — an IR window emits as a grey body with
 *                   emissivity 1−τw; its own reflection of the room is neglected (folded into τw when the
 *                   maker quotes an effective transmission).
 *   scene:          W_scene = ε·τ·W(T_obj) + (1−ε)·τ·W(T_refl) + (1−τ)·W(T_atm)
 * Solving: W(T_obj) = (W_app·α + β)/ε + W(T_refl), with α = 1/(τw·τ) and
 *   β = −[(1−τw)·W(T_w)/τw + (1−τ)·W(T_atm) + τ·W(T_refl)]/τ.
 */
export function measurementTerms(params: Omit<CorrectionInput, 'apparentK' | 'emissivity'>): MeasurementTerms {
  const { fromUm, toUm } = params.band
  const tau = params.transmittance ?? 1
  const wRefl = bandRadianceUnchecked(params.reflectedK, fromUm, toUm)
  const wAtm = bandRadianceUnchecked(params.atmosphereK ?? params.reflectedK, fromUm, toUm)
  const tauW = params.window?.transmittance ?? 1
  const wWindow = params.window ? bandRadianceUnchecked(params.window.tempK, fromUm, toUm) : 0
  const alpha = 1 / (tauW * tau)
  const beta = -(((1 - tauW) * wWindow) / tauW + (1 - tau) * wAtm + tau * wRefl) / tau
  return { alpha, beta, reflectedRadiance: wRefl }
}

/** Band radiance the object itself must emit as a blackbody, W·m⁻²·sr⁻¹ (may be ≤ 0 for impossible readings). */
export function objectRadiance(input: CorrectionInput): number {
  validateCorrectionInput(input)
  const terms = measurementTerms(input)
  const wApp = bandRadianceUnchecked(input.apparentK, input.band.fromUm, input.band.toUm)
  return (wApp * terms.alpha + terms.beta) / input.emissivity + terms.reflectedRadiance
}

/** The error for a reading that no object temperature can explain. */
export function outshineError(): ThermalInputError {
  return new ThermalInputError(
    'reflection-outshines-target',
    'The reflected source (or the air or window) outshines the target: with this emissivity and reflected ' +
      'temperature no object temperature explains the reading. Check the reflected temperature and the emissivity.',
    'reflectedK',
  )
}

/** Object temperature in K from the band measurement equation, inverted with Planck's law (not σT⁴). */
export function objectTemperature(input: CorrectionInput): number {
  const w = objectRadiance(input)
  if (!(w > 0)) throw outshineError()
  return invertRadiance(w, input.band.fromUm, input.band.toUm, input.apparentK)
}

/**
 * The σT⁴ shortcut: the same equation with total (all-wavelength) radiance in place of band radiance.
 * Shown beside the band result for comparison only; it is wrong inside a band (reference sheet §3).
 */
export function objectTemperatureSigma(input: CorrectionInput): number {
  validateCorrectionInput(input)
  const p4 = (t: number): number => t * t * t * t
  const tau = input.transmittance ?? 1
  const tauW = input.window?.transmittance ?? 1
  const scene = input.window ? (p4(input.apparentK) - (1 - tauW) * p4(input.window.tempK)) / tauW : p4(input.apparentK)
  const obj =
    (scene - (1 - input.emissivity) * tau * p4(input.reflectedK) - (1 - tau) * p4(input.atmosphereK ?? input.reflectedK)) /
    (input.emissivity * tau)
  if (!(obj > 0)) throw outshineError()
  return Math.sqrt(Math.sqrt(obj))
}
