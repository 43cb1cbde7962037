import { ZERO_CELSIUS_K } from './constants'
import { type CorrectionInput, objectTemperature } from './correction'
import { ThermalInputError, isThermalInputError } from './errors'

/** A closed interval, in the unit of the quantity it bounds. */
export interface Interval {
  low: number
  high: number
}

/** The instrument's stated accuracy: the larger of an absolute and a relative figure. */
export interface InstrumentAccuracy {
  /** e.g. 2 for ±2 K. */
  absoluteK?: number
  /** e.g. 2 for ±2 % of the reading in °C, as imager makers state it. */
  relativePct?: number
}

/** Tolerances of a reading's inputs (each ±). */
export interface Tolerances {
  emissivity?: number
  reflectedK?: number
  instrument?: InstrumentAccuracy
}

/** Smallest emissivity a tolerance can push the setting down to; ε = 0 has no solution. */
export const EMISSIVITY_FLOOR = 0.01

/** Half-width of the instrument's accuracy at one apparent reading, K. */
export function instrumentToleranceK(apparentK: number, accuracy: InstrumentAccuracy | undefined): number {
  if (!accuracy) return 0
  const abs = accuracy.absoluteK ?? 0
  // Makers state the relative figure against the reading in °C, so a 0 °C reading has no relative part.
  const rel = ((accuracy.relativePct ?? 0) / 100) * Math.abs(apparentK - ZERO_CELSIUS_K)
  return Math.max(abs, rel)
}

/** One corner of the tolerance box, as offsets from the nominal inputs. */
interface Corner {
  dEmissivity: number
  dReflectedK: number
  /** −1 or +1: direction of the instrument error. */
  instrumentSign: number
}

function corners(tol: Tolerances): Corner[] {
  const de = Math.abs(tol.emissivity ?? 0)
  const dr = Math.abs(tol.reflectedK ?? 0)
  const out: Corner[] = []
  for (const dEmissivity of de ? [-de, de] : [0])
    for (const dReflectedK of dr ? [-dr, dr] : [0])
      for (const instrumentSign of [-1, 1]) out.push({ dEmissivity, dReflectedK, instrumentSign })
  return out
}

function atCorner(input: CorrectionInput, corner: Corner, accuracy: InstrumentAccuracy | undefined): number {
  const shift = corner.instrumentSign * instrumentToleranceK(input.apparentK, accuracy)
  return objectTemperature({
    ...input,
    apparentK: Math.max(1, input.apparentK + shift),
    emissivity: Math.min(1, Math.max(EMISSIVITY_FLOOR, input.emissivity + corner.dEmissivity)),
    reflectedK: Math.max(1, input.reflectedK + corner.dReflectedK),
  })
}

function unbounded(e: unknown): never {
  if (isThermalInputError(e) && e.code === 'reflection-outshines-target') {
    throw new ThermalInputError(
      'uncertainty-unbounded',
      'Within these tolerances the reflected source can outshine the target, so the corrected temperature ' +
        'has no lower bound. Tighten the emissivity or reflected-temperature tolerance, or measure them.',
      'tolerances',
    )
  }
  throw e
}

/**
 * Interval of the object temperature, K, from the tolerances of ε, reflected temperature and instrument.
 *
 * Approach: the solved radiance is W_obj = A/(ε·τ) + W(T_refl) with A = W_scene − τ·W(T_refl) − (1−τ)·W(T_atm).
 * For fixed ε it rises with T_app and falls with T_refl (its T_refl slope is W′(T_refl)·(1 − 1/ε) ≤ 0);
 * for fixed T_app and T_refl it is monotone in ε (sign of A). So its extremes over the box of tolerances are
 * at the box's corners (ε ± δε clamped to (0, 1], T_refl ± δT, T_app ± accuracy), and evaluating all eight
 * corners gives the exact interval, not a linearised estimate.
 */
export function objectTemperatureInterval(input: CorrectionInput, tolerances: Tolerances): Interval {
  let low = Number.POSITIVE_INFINITY
  let high = Number.NEGATIVE_INFINITY
  try {
    for (const corner of corners(tolerances)) {
      const t = atCorner(input, corner, tolerances.instrument)
      if (t < low) low = t
      if (t > high) high = t
    }
  } catch (e) {
    unbounded(e)
  }
  return { low, high }
}

/**
 * Interval of the rise of a hot spot over a similar component read in the same image, K.
 *
 * Both readings share the imager, the ε setting and the reflected temperature, so their errors move together:
 * the rise is evaluated at the same eight corners for both and its extremes taken. (Treating the two as
 * independent would double-count a common offset that cancels in the difference.) The tests check the
 * corners against a dense grid of the box.
 */
export function riseInterval(hot: CorrectionInput, reference: CorrectionInput, tolerances: Tolerances): Interval {
  let low = Number.POSITIVE_INFINITY
  let high = Number.NEGATIVE_INFINITY
  try {
    for (const corner of corners(tolerances)) {
      const rise = atCorner(hot, corner, tolerances.instrument) - atCorner(reference, corner, tolerances.instrument)
      if (rise < low) low = rise
      if (rise > high) high = rise
    }
  } catch (e) {
    unbounded(e)
  }
  return { low, high }
}
