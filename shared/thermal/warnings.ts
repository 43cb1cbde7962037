import { type BandNumber, type CriteriaSet, NETA_100_18, rankRise } from './criteria'
import { pixelsAcross, spotSizeMm, targetCoversPixels } from './optics'
import type { Interval } from './uncertainty'

/** How much a warning should hold up a finding: note it, check it, or do not rely on the number. */
export type WarningSeverity = 'info' | 'warning' | 'critical'

/** Machine-readable warning codes. */
export type WarningCode =
  | 'load-not-recorded'
  | 'load-low'
  | 'emissivity-low'
  | 'target-small'
  | 'wind-elevated'
  | 'wind-above-limit'
  | 'calibration-overdue'
  | 'interval-crosses-band'
  | 'uncertainty-unbounded'

/** One validity warning with plain-language text. */
export interface ReadingWarning {
  code: WarningCode
  severity: WarningSeverity
  message: string
}

/** What readingWarnings looks at; every field is optional and only present fields are checked. */
export interface WarningInput {
  loadA?: number
  ratedA?: number
  emissivity?: number
  targetMm?: number
  ifovMrad?: number
  distanceM?: number
  windMs?: number
  /** Instrument calibration due date (Date or ISO yyyy-mm-dd). */
  calibrationDue?: Date | string
  /** The survey date; defaults to now. */
  today?: Date | string
  /** Uncertainty intervals of the rises as ranked (after load scaling), K. */
  riseIntervals?: { overReferenceK?: Interval; overAmbientK?: Interval }
  criteria?: CriteriaSet
}

/** Thresholds; defaults from the reference sheet, overridable per tenant. */
export interface WarningLimits {
  /** NFPA 70B (2023) §7.4.5: inspect at no less than 40 % of normal load. */
  minLoadFraction: number
  /** Below ε ≈ 0.5 uncertainty grows quickly (reference sheet §3). */
  minEmissivity: number
  /** 3 × 3 pixel rule (common practice). */
  minPixels: number
  /** EPRI 1017693: above about 2.2 m/s wind begins to matter. */
  windNoteMs: number
  /** EPRI 1017693: above about 6.7 m/s readings can be meaningless. */
  windLimitMs: number
}

/** Default thresholds (sources beside each field of WarningLimits). */
export const DEFAULT_WARNING_LIMITS: WarningLimits = {
  minLoadFraction: 0.4,
  minEmissivity: 0.5,
  minPixels: 3,
  windNoteMs: 2.2,
  windLimitMs: 6.7,
}

function isoDay(d: Date | string): string {
  return typeof d === 'string' ? d.slice(0, 10) : d.toISOString().slice(0, 10)
}

const fmt = (v: number, digits = 1): string => v.toFixed(digits)

function bandLabel(b: BandNumber | null): string {
  return b === null ? 'below the lowest band' : `band ${b}`
}

/** Validity warnings for a reading; an empty array means nothing to flag. */
export function readingWarnings(input: WarningInput, limits: Partial<WarningLimits> = {}): ReadingWarning[] {
  const lim = { ...DEFAULT_WARNING_LIMITS, ...limits }
  const out: ReadingWarning[] = []

  if (input.loadA === undefined || input.ratedA === undefined) {
    out.push({
      code: 'load-not-recorded',
      severity: 'info',
      message: 'Record the load and the rated current: a rise means little without the load it was measured at.',
    })
  } else if (input.ratedA > 0 && input.loadA / input.ratedA < lim.minLoadFraction) {
    out.push({
      code: 'load-low',
      severity: 'warning',
      message:
        `Load is ${fmt((100 * input.loadA) / input.ratedA, 0)} % of rated, below the ${fmt(100 * lim.minLoadFraction, 0)} % ` +
        'minimum (NFPA 70B §7.4.5). Problems may not show, and scaling the rise up to full load multiplies its error.',
    })
  }

  if (input.emissivity !== undefined && input.emissivity < lim.minEmissivity) {
    out.push({
      code: 'emissivity-low',
      severity: 'warning',
      message:
        `Emissivity ${fmt(input.emissivity, 2)} is below ${fmt(lim.minEmissivity, 2)}: small errors in ε or the reflected ` +
        'temperature make large errors in the result. Use a high-emissivity spot (tape, paint, oxidised surface) if you can.',
    })
  }

  if (input.targetMm !== undefined && input.ifovMrad !== undefined && input.distanceM !== undefined) {
    const across = pixelsAcross(input.targetMm, input.ifovMrad, input.distanceM)
    if (!targetCoversPixels(input.targetMm, input.ifovMrad, input.distanceM, lim.minPixels)) {
      out.push({
        code: 'target-small',
        severity: 'warning',
        message:
          `The target spans ${fmt(across)} pixels across (one pixel sees ${fmt(spotSizeMm(input.ifovMrad, input.distanceM))} mm ` +
          `at ${fmt(input.distanceM)} m); at least ${lim.minPixels} × ${lim.minPixels} are needed, or it reads low. Move closer or use a telephoto lens.`,
      })
    }
  }

  if (input.windMs !== undefined) {
    if (input.windMs > lim.windLimitMs) {
      out.push({
        code: 'wind-above-limit',
        severity: 'critical',
        message: `Wind ${fmt(input.windMs)} m/s is above ${fmt(lim.windLimitMs)} m/s: convective cooling can hide a problem entirely; re-survey in calmer conditions.`,
      })
    } else if (input.windMs > lim.windNoteMs) {
      out.push({
        code: 'wind-elevated',
        severity: 'info',
        message: `Wind ${fmt(input.windMs)} m/s is above ${fmt(lim.windNoteMs)} m/s: outdoor rises read lower than in still air.`,
      })
    }
  }

  if (input.calibrationDue !== undefined) {
    const due = isoDay(input.calibrationDue)
    const today = isoDay(input.today ?? new Date())
    if (today > due) {
      out.push({
        code: 'calibration-overdue',
        severity: 'warning',
        message: `The instrument was due for calibration on ${due}; its accuracy is no longer assured.`,
      })
    }
  }

  const ri = input.riseIntervals
  if (ri && (ri.overReferenceK || ri.overAmbientK)) {
    const criteria = input.criteria ?? NETA_100_18
    // Bands only grow more severe with the rise, so the two ends of the intervals bound every band in between.
    const low = rankRise({ overReferenceK: ri.overReferenceK?.low, overAmbientK: ri.overAmbientK?.low }, criteria).band
    const high = rankRise({ overReferenceK: ri.overReferenceK?.high, overAmbientK: ri.overAmbientK?.high }, criteria).band
    if (low !== high) {
      out.push({
        code: 'interval-crosses-band',
        severity: 'warning',
        message: `Within the uncertainty the result could be ${bandLabel(low)} or ${bandLabel(high)}. Reduce the uncertainty or rank on the more severe end.`,
      })
    }
  }
  return out
}
