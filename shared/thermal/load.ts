import { ThermalInputError } from './errors'

/**
 * Rise scaled to the reference load, ΔT·(I_ref/I_meas)^n (reference sheet §2; n from 1.6 to 2.0).
 * Scaling up from a low load multiplies every error in the measured rise by the same factor.
 */
export function loadScaledRise(riseK: number, measuredA: number, referenceA: number, exponent = 2): number {
  return riseK * loadScaleFactor(measuredA, referenceA, exponent)
}

/** The factor (I_ref/I_meas)^n on its own. */
export function loadScaleFactor(measuredA: number, referenceA: number, exponent = 2): number {
  if (!(Number.isFinite(measuredA) && measuredA > 0)) {
    throw new ThermalInputError('invalid-input', 'The measured load must be a current above 0 A.', 'loadA')
  }
  if (!(Number.isFinite(referenceA) && referenceA > 0)) {
    throw new ThermalInputError('invalid-input', 'The rated (reference) current must be above 0 A.', 'ratedA')
  }
  if (!(Number.isFinite(exponent) && exponent > 0)) {
    throw new ThermalInputError('invalid-input', 'The load exponent must be a positive number (usually 1.6 to 2.0).', 'loadExponent')
  }
  return (referenceA / measuredA) ** exponent
}

/**
 * Highest allowed temperature at the measured load for a part whose rated rise is ΔT_rated:
 * T_max,corr = (I_meas/I_rated)^n·ΔT_rated + T_ambient (reference sheet §1.3, practitioner guidance).
 */
export function allowedTemperatureAtLoadC(ratedRiseK: number, measuredA: number, ratedA: number, ambientC: number, exponent = 2): number {
  return ratedRiseK / loadScaleFactor(measuredA, ratedA, exponent) + ambientC
}

/** Wind speeds (m/s) and multipliers of the commonly quoted outdoor table (reference sheet §2, from memory). */
export const WIND_FACTOR_TABLE: ReadonlyArray<readonly [number, number]> = [
  [1, 1.0],
  [2, 1.36],
  [3, 1.64],
  [4, 1.86],
  [5, 2.06],
  [6, 2.23],
  [7, 2.39],
  [8, 2.54],
]

/** Provenance of the wind multiplier, to show wherever it is used. */
export const WIND_FACTOR_NOTE =
  'Estimate: a commonly quoted multiplier for outdoor rises, often credited to Perch-Nielsen and Sørensen ' +
  '(SPIE 2245, 1994); the original table is unverified. Off unless your organisation turns it on.'

/** A wind multiplier, always labelled as an estimate. */
export interface WindFactor {
  factor: number
  estimate: true
  /** True above 8 m/s, where the table ends and the fit (v / 1 m/s)^0.448 is extended. */
  extrapolated: boolean
  note: string
}

/** Multiplier for a rise measured in wind of `speedMs` (linear between table rows; 1 at or below 1 m/s). */
export function windFactor(speedMs: number): WindFactor {
  if (!(Number.isFinite(speedMs) && speedMs >= 0)) {
    throw new ThermalInputError('invalid-input', 'Wind speed must be 0 m/s or more.', 'windMs')
  }
  const table = WIND_FACTOR_TABLE
  const last = table[table.length - 1]!
  if (speedMs <= 1) return { factor: 1, estimate: true, extrapolated: false, note: WIND_FACTOR_NOTE }
  if (speedMs > last[0]) {
    return { factor: speedMs ** 0.448, estimate: true, extrapolated: true, note: WIND_FACTOR_NOTE }
  }
  let i = 1
  while (table[i]![0] < speedMs) i++
  const [v0, f0] = table[i - 1]!
  const [v1, f1] = table[i]!
  return { factor: f0 + ((f1 - f0) * (speedMs - v0)) / (v1 - v0), estimate: true, extrapolated: false, note: WIND_FACTOR_NOTE }
}
