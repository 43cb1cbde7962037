/** Machine-readable reasons an input cannot be turned into a temperature. */
export type ThermalErrorCode =
  | 'invalid-temperature'
  | 'invalid-emissivity'
  | 'invalid-transmittance'
  | 'invalid-band'
  | 'invalid-radiance'
  | 'radiance-out-of-range'
  | 'reflection-outshines-target'
  | 'uncertainty-unbounded'
  | 'invalid-input'

/** Error thrown when a reading cannot be corrected; `message` is written for the person entering it. */
export class ThermalInputError extends Error {
  override readonly name = 'ThermalInputError'
  constructor(
    readonly code: ThermalErrorCode,
    message: string,
    readonly field?: string,
  ) {
    super(message)
  }
}

/** True for a ThermalInputError, also across bundle boundaries where instanceof can fail. */
export function isThermalInputError(e: unknown): e is ThermalInputError {
  return e instanceof ThermalInputError || (e instanceof Error && e.name === 'ThermalInputError' && 'code' in e)
}
