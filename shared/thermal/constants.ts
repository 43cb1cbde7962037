// CODATA 2018 values (NIST). h, c and kB are exact by definition of the SI since 2019;
// the derived constants are computed from them rather than typed in, so they stay consistent.

/** Planck constant, J·s (CODATA 2018, exact). */
export const h = 6.626_070_15e-34
/** Speed of light in vacuum, m/s (CODATA 2018, exact). */
export const c = 299_792_458
/** Boltzmann constant, J/K (CODATA 2018, exact). */
export const kB = 1.380_649e-23
/** Stefan–Boltzmann constant, W·m⁻²·K⁻⁴ (CODATA 2018). */
export const sigma = 5.670_374_419e-8
/** Wien wavelength displacement constant b, m·K (CODATA 2018). */
export const wienB = 2.897_771_955e-3
/** First radiation constant for spectral radiance, c₁L = 2hc², W·m²·sr⁻¹. */
export const c1L = 2 * h * c * c
/** First radiation constant c₁ = 2πhc², W·m². */
export const c1 = 2 * Math.PI * h * c * c
/** Second radiation constant c₂ = hc/k, m·K. */
export const c2 = (h * c) / kB
/** Second radiation constant in µm·K, the unit blackbody-fraction tables use. */
export const c2UmK = c2 * 1e6
/** Kelvin offset of the Celsius scale. */
export const ZERO_CELSIUS_K = 273.15
