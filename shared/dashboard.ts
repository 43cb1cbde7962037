// The programme dashboard's vocabulary shared by the server (SQL buckets) and the page (labels, definitions).

/** Age buckets in whole days, both ends included; the last one is open-ended. */
export const AGE_BUCKETS = [
  { key: 'd0_30', label: '0–30 days', min: 0, max: 30 },
  { key: 'd31_90', label: '31–90 days', min: 31, max: 90 },
  { key: 'd91_365', label: '91–365 days', min: 91, max: 365 },
  { key: 'd366', label: 'over 365 days', min: 366, max: null },
] as const
export type AgeBucketKey = (typeof AGE_BUCKETS)[number]['key']

/** Work-order states that count as backlog (not closed, not cancelled). */
export const BACKLOG_STATES = ['open', 'planned', 'in_repair', 'awaiting_verification', 'deferred'] as const
export type BacklogState = (typeof BACKLOG_STATES)[number]

export const BACKLOG_STATE_LABELS: Record<BacklogState, string> = {
  open: 'Open',
  planned: 'Planned',
  in_repair: 'In repair',
  awaiting_verification: 'Awaiting verification',
  deferred: 'Deferred',
}

/** Band colours: stops of the open inferno colour map (product brief); unranked findings in slate. */
export const BAND_COLOURS: Record<1 | 2 | 3 | 4, string> = { 1: '#A52C60', 2: '#E35933', 3: '#FB9B06', 4: '#F6D746' }
export const UNRANKED_COLOUR = '#64748B'

/** The first day of a default period: one year back from `to`, plus a day (so the period is 12 whole months). */
export function defaultFrom(to: string): string {
  const d = new Date(`${to}T00:00:00Z`)
  d.setUTCFullYear(d.getUTCFullYear() - 1)
  d.setUTCDate(d.getUTCDate() + 1)
  return d.toISOString().slice(0, 10)
}

/**
 * What each figure means, word for word as the page shows it and the README lists it. As on the Due screen, a check
 * counts when it is clear or a finding (not "not reached") on a survey handed in or reviewed and not archived; checks,
 * findings and verifications are dated by the day they were recorded, in the organisation's time zone.
 */
export const FIGURE_DEFINITIONS = {
  coverage:
    'Assets checked on time ÷ assets due in the period. An asset is due when the due date from its last check before the period (interval by condition, own interval or open finding, as on the Due screen) falls on or before the period end; assets never checked before are due by the period end. On time: checked (clear or finding) in the period on or before that due date. Late: checked in the period after it. Missed: not checked in the period.',
  overdue:
    'Today: active assets whose due date (as on the Due screen) is before today, and the sites that have at least one. Not limited by the period.',
  openFindings:
    'Today: findings not closed by a passed verification and not archived, on surveys handed in or reviewed, by band (the reviewed band when a manager corrected it) and by age (days since they were recorded). Not limited by the period.',
  findingsPer100:
    'Findings recorded in the period × 100 ÷ distinct assets checked (clear or finding) in the period. Only surveys handed in or reviewed count.',
  repeats:
    'Findings in the period on a component (same asset, component and phase, ignoring case and spaces at the ends) that already had an earlier finding, at any time before.',
  backlog:
    'Today: work orders not closed or cancelled (open, planned, in repair, awaiting verification, deferred), by age (days since the work order was made). Not limited by the period.',
  timeToRepair:
    'For findings whose repair passed verification in the period: the median of the days from the finding being recorded to its first passed verification, per band (middle value; the mean of the two middle values for an even count).',
  verification:
    'Verifications recorded in the period that passed ÷ all recorded in the period (passed or failed; waiting and withdrawn ones are left out).',
} as const
export type FigureKey = keyof typeof FIGURE_DEFINITIONS

/** 0..1 → "33.3 %"; "—" when there is nothing to divide. */
export function percent(rate: number | null): string {
  return rate === null ? '—' : `${(rate * 100).toLocaleString('en-GB', { maximumFractionDigits: 1 })} %`
}

/** A count or a decimal with at most one decimal place; "—" for null. */
export function decimal(value: number | null, digits = 1): string {
  return value === null ? '—' : value.toLocaleString('en-GB', { maximumFractionDigits: digits })
}

/** Sites drawn in the coverage chart and table: past this many (5 000 at a large utility), the least covered. */
export const COVERAGE_SITES_SHOWN = 25
/** Sites named under the overdue figure, most overdue first. */
export const OVERDUE_SITES_SHOWN = 5

/**
 * The `limit` sites with the lowest coverage (then the most assets due), kept in their listed order (by code): a
 * chart of thousands of bars says nothing, and its answer would be a megabyte.
 */
export function worstCovered<T extends { rate: number | null; due: number }>(sites: T[], limit: number): T[] {
  if (sites.length <= limit) return sites
  const chosen = new Set(sites.map((site, i) => ({ site, i }))
    .sort((a, b) => (a.site.rate ?? 1) - (b.site.rate ?? 1) || b.site.due - a.site.due || a.i - b.i)
    .slice(0, limit).map((x) => x.i))
  return sites.filter((_, i) => chosen.has(i))
}
