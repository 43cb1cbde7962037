// Imager records: band presets and the calibration flag, shared by the server, the pages and the tests.
import { IMAGER_BANDS } from './thermal/bands'
import { daysBetween } from './schedule'

/** Days before the calibration date at which an instrument is flagged as due soon. */
export const CALIBRATION_WARNING_DAYS = 30

export type CalibrationStatus = 'overdue' | 'due soon' | 'in date' | 'unknown'

/**
 * Calibration state on a given local date: past the due date is overdue (readings taken with it are flagged);
 * within CALIBRATION_WARNING_DAYS is due soon; no date recorded is unknown.
 */
export function calibrationStatus(calibrationDue: string | null | undefined, today: string): CalibrationStatus {
  if (!calibrationDue) return 'unknown'
  const days = daysBetween(today, calibrationDue)
  if (days < 0) return 'overdue'
  return days <= CALIBRATION_WARNING_DAYS ? 'due soon' : 'in date'
}

/** The preset a band matches (LWIR 7.5–14, LWIR 8–14, MWIR 3–5), or 'custom'. */
export function bandPresetOf(fromUm: number, toUm: number): (typeof IMAGER_BANDS)[number]['id'] | 'custom' {
  const match = IMAGER_BANDS.find((b) => Math.abs(b.band.fromUm - fromUm) < 1e-6 && Math.abs(b.band.toUm - toUm) < 1e-6)
  return match ? match.id : 'custom'
}

/** "LWIR 7.5–14 µm", or "6.5–12 µm" for a custom band. */
export function bandLabel(fromUm: number, toUm: number): string {
  const preset = IMAGER_BANDS.find((b) => b.id === bandPresetOf(fromUm, toUm))
  return preset ? preset.label : `${fromUm}–${toUm} µm`
}
