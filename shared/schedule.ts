// Inspection schedules: when each asset is next due. Plain TypeScript shared by the server, the pages and the tests.
// The SQL in server/services/schedule-sql.ts computes the same thing for paginated lists; keep the two in step.

/** A severity band of a finding, 1 = most severe. */
export type Band = 1 | 2 | 3 | 4

/** An asset's condition: 1 good, 2 fair, 3 poor (worst of physical condition, criticality and environment). */
export type Condition = 1 | 2 | 3

/** The organisation's schedule settings. */
export interface ScheduleRule {
  /** Interval for condition 1 and 2, in months. */
  normalMonths: number
  /** Interval for condition 3, in months. */
  condition3Months: number
  /** Bands of an open finding that shorten the interval while the finding stays open. */
  monitorBands: readonly Band[]
  /** Factor applied to the interval while such a finding is open (0 < factor ≤ 1). */
  monitorFactor: number
}

/**
 * Default intervals: 12 months for condition 1–2 and 6 months for condition 3 (NFPA 70B 2023 Table 9.2.2);
 * an open finding in band 2 ("monitor") halves the interval until it is repaired (common practice).
 */
export const DEFAULT_SCHEDULE_RULE: ScheduleRule = Object.freeze({
  normalMonths: 12,
  condition3Months: 6,
  monitorBands: Object.freeze([2]) as readonly Band[],
  monitorFactor: 0.5,
})

export type IntervalReason = 'condition' | 'asset override' | 'open finding'

export interface IntervalInput {
  condition: Condition
  /** The asset's own interval in months, overriding the organisation's (assets.interval_months). */
  assetIntervalMonths?: number | null
  /** Band of the asset's worst open finding, if any. */
  openFindingBand?: Band | null
}

export interface Interval {
  months: number
  /** Why the interval is what it is: the last rule that changed it. */
  reason: IntervalReason
}

/** The asset's inspection interval in whole months (at least 1). */
export function intervalMonths(input: IntervalInput, rule: ScheduleRule = DEFAULT_SCHEDULE_RULE): Interval {
  checkRule(rule)
  if (![1, 2, 3].includes(input.condition)) throw new RangeError(`condition must be 1, 2 or 3, got ${input.condition}`)
  let months = input.condition === 3 ? rule.condition3Months : rule.normalMonths
  let reason: IntervalReason = 'condition'
  if (input.assetIntervalMonths != null) {
    if (!(Number.isInteger(input.assetIntervalMonths) && input.assetIntervalMonths >= 1)) {
      throw new RangeError(`assetIntervalMonths must be a whole number ≥ 1, got ${input.assetIntervalMonths}`)
    }
    months = input.assetIntervalMonths
    reason = 'asset override'
  }
  if (input.openFindingBand != null && rule.monitorBands.includes(input.openFindingBand)) {
    // Rounded down: a shortened interval errs towards looking sooner.
    months = Math.max(1, Math.floor(months * rule.monitorFactor + 1e-9))
    reason = 'open finding'
  }
  return { months, reason }
}

function checkRule(rule: ScheduleRule): void {
  for (const [name, v] of [['normalMonths', rule.normalMonths], ['condition3Months', rule.condition3Months]] as const) {
    if (!(Number.isInteger(v) && v >= 1)) throw new RangeError(`${name} must be a whole number ≥ 1, got ${v}`)
  }
  if (!(rule.monitorFactor > 0 && rule.monitorFactor <= 1)) throw new RangeError(`monitorFactor must be in (0, 1], got ${rule.monitorFactor}`)
}

const ISO_DATE = /^(\d{4})-(\d{2})-(\d{2})$/

function parseDate(iso: string): { y: number; m: number; d: number } {
  const match = ISO_DATE.exec(iso)
  if (!match) throw new RangeError(`Expected a date as YYYY-MM-DD, got ${iso}`)
  const y = Number(match[1])
  const m = Number(match[2])
  const d = Number(match[3])
  if (m < 1 || m > 12 || d < 1 || d > daysInMonth(y, m)) throw new RangeError(`Not a calendar date: ${iso}`)
  return { y, m, d }
}

function daysInMonth(y: number, m: number): number {
  return new Date(Date.UTC(y, m, 0)).getUTCDate()
}

function format(y: number, m: number, d: number): string {
  return `${String(y).padStart(4, '0')}-${String(m).padStart(2, '0')}-${String(d).padStart(2, '0')}`
}

/** A calendar date plus whole months; the 31st becomes the last day of a shorter month (as PostgreSQL does). */
export function addMonths(iso: string, months: number): string {
  if (!Number.isInteger(months)) throw new RangeError(`months must be a whole number, got ${months}`)
  const { y, m, d } = parseDate(iso)
  const index = y * 12 + (m - 1) + months
  const ny = Math.floor(index / 12)
  const nm = index - ny * 12 + 1
  return format(ny, nm, Math.min(d, daysInMonth(ny, nm)))
}

/** A calendar date plus whole days. */
export function addDays(iso: string, days: number): string {
  const { y, m, d } = parseDate(iso)
  const t = new Date(Date.UTC(y, m - 1, d + days))
  return format(t.getUTCFullYear(), t.getUTCMonth() + 1, t.getUTCDate())
}

/** Whole days from `from` to `to` (negative when `to` is earlier). */
export function daysBetween(from: string, to: string): number {
  const a = parseDate(from)
  const b = parseDate(to)
  return Math.round((Date.UTC(b.y, b.m - 1, b.d) - Date.UTC(a.y, a.m - 1, a.d)) / 86_400_000)
}

/** Today's calendar date in a time zone (the organisation's), as YYYY-MM-DD. */
export function todayIn(timeZone: string, now: Date = new Date()): string {
  try {
    return new Intl.DateTimeFormat('en-CA', { timeZone, year: 'numeric', month: '2-digit', day: '2-digit' }).format(now)
  } catch {
    return now.toISOString().slice(0, 10)
  }
}

export interface DueInput extends IntervalInput {
  /** Local date of the asset's last check, or null when it was never checked. */
  lastCheckedOn: string | null
}

export interface Due extends Interval {
  /** The date the next check is due. */
  dueOn: string
  /** Never checked: a baseline survey is due now. */
  baseline: boolean
}

/** When the asset's next check is due: its last check plus its interval, or `today` for a baseline survey. */
export function nextDue(input: DueInput, today: string, rule: ScheduleRule = DEFAULT_SCHEDULE_RULE): Due {
  const interval = intervalMonths(input, rule)
  parseDate(today)
  if (input.lastCheckedOn == null) return { ...interval, dueOn: today, baseline: true }
  return { ...interval, dueOn: addMonths(input.lastCheckedOn, interval.months), baseline: false }
}

/** The look-ahead windows of the programme view, in days. */
export const DUE_WINDOWS = [30, 60, 90] as const
export type DueWindow = (typeof DUE_WINDOWS)[number]

export type DueStatus = 'overdue' | 'due' | 'later'

/**
 * Where a due date falls relative to today and a look-ahead window: before today is overdue; from today up to
 * and including today + window days is due; after that, later.
 */
export function dueStatus(dueOn: string, today: string, windowDays: number): DueStatus {
  const days = daysBetween(today, dueOn)
  if (days < 0) return 'overdue'
  return days <= windowDays ? 'due' : 'later'
}
