// Unit conversions. The engine works in kelvin and metres; people enter and read °C/°F and m/ft.
// A temperature (a point on a scale) and a temperature difference (a rise) convert differently:
// use the *Delta* functions for rises.

/** Temperature unit a person reads and enters. */
export type TemperatureUnit = 'C' | 'F'
/** Length unit a person reads and enters. */
export type LengthUnit = 'm' | 'ft'

const ZERO_C_K = 273.15
const FT_M = 0.3048

/** °C → K. */
export const cToK = (c: number): number => c + ZERO_C_K
/** K → °C. */
export const kToC = (k: number): number => k - ZERO_C_K
/** °F → °C. */
export const fToC = (f: number): number => ((f - 32) * 5) / 9
/** °C → °F. */
export const cToF = (c: number): number => (c * 9) / 5 + 32
/** K → °F. */
export const kToF = (k: number): number => cToF(kToC(k))
/** °F → K. */
export const fToK = (f: number): number => cToK(fToC(f))
/** Metres → feet. */
export const mToFt = (m: number): number => m / FT_M
/** Feet → metres (international foot, exact). */
export const ftToM = (ft: number): number => ft * FT_M

/** A temperature in the person's unit → K. */
export function toKelvin(value: number, unit: TemperatureUnit): number {
  return unit === 'C' ? cToK(value) : fToK(value)
}

/** K → a temperature in the person's unit. */
export function fromKelvin(k: number, unit: TemperatureUnit): number {
  return unit === 'C' ? kToC(k) : kToF(k)
}

/** A rise in K (= °C difference) → the person's unit of difference. */
export function deltaFromKelvin(dk: number, unit: TemperatureUnit): number {
  return unit === 'C' ? dk : (dk * 9) / 5
}

/** A rise in the person's unit of difference → K. */
export function deltaToKelvin(d: number, unit: TemperatureUnit): number {
  return unit === 'C' ? d : (d * 5) / 9
}

/** A length in the person's unit → metres. */
export function toMetres(value: number, unit: LengthUnit): number {
  return unit === 'm' ? value : ftToM(value)
}

/** Metres → a length in the person's unit. */
export function fromMetres(m: number, unit: LengthUnit): number {
  return unit === 'm' ? m : mToFt(m)
}

/** Symbol shown beside a temperature. */
export const temperatureSymbol = (unit: TemperatureUnit): string => (unit === 'C' ? '°C' : '°F')

/** Symbol shown beside a rise: K for Celsius users (as the standards write rises), °F otherwise. */
export const deltaSymbol = (unit: TemperatureUnit): string => (unit === 'C' ? 'K' : '°F')

/** Fixed decimals with a true minus sign and no "−0". */
export function formatNumber(value: number, digits = 1): string {
  if (!Number.isFinite(value)) return '—'
  const s = value.toFixed(digits)
  if (Number(s) === 0) return (0).toFixed(digits)
  return s.replace('-', '−')
}

/** A temperature given in K, shown in the person's unit with its symbol, e.g. "68.4 °C". */
export function formatTemperature(k: number, unit: TemperatureUnit, digits = 1): string {
  return `${formatNumber(fromKelvin(k, unit), digits)} ${temperatureSymbol(unit)}`
}

/** A rise given in K, shown in the person's unit of difference, e.g. "12.3 K" or "22.1 °F". */
export function formatDelta(dk: number, unit: TemperatureUnit, digits = 1): string {
  return `${formatNumber(deltaFromKelvin(dk, unit), digits)} ${deltaSymbol(unit)}`
}

/** A distance given in m, shown in the person's unit, e.g. "4.0 m" or "13.1 ft". */
export function formatLength(m: number, unit: LengthUnit, digits = 1): string {
  return `${formatNumber(fromMetres(m, unit), digits)} ${unit}`
}
