// Pure rules of work orders, shared by the server, the pages and the unit tests.
import { addDays } from './schedule'
import type { RepairDeadlines } from './types/work-order'
import type { WorkOrderStateName } from './schemas/work-order'

/**
 * Default repair deadlines per band in days (reference sheet §6, common practice: band 1 immediately, band 2 about
 * 30 days, band 3 at the next scheduled maintenance taken as 180 days, band 4 record and trend). Organisations edit them.
 */
export const DEFAULT_REPAIR_DEADLINES: RepairDeadlines = { repairDaysBand1: 1, repairDaysBand2: 30, repairDaysBand3: 180, repairDaysBand4: null }

/** The most severe band of several (1 is the most severe); null when none is ranked. */
export function mostSevereBand(bands: ReadonlyArray<number | null | undefined>): number | null {
  const ranked = bands.filter((b): b is number => typeof b === 'number')
  return ranked.length ? Math.min(...ranked) : null
}

/** Repair deadline in days for a band under an organisation's settings; null = no due date. */
export function repairDaysFor(band: number | null, d: RepairDeadlines): number | null {
  if (band === 1) return d.repairDaysBand1
  if (band === 2) return d.repairDaysBand2
  if (band === 3) return d.repairDaysBand3
  if (band === 4) return d.repairDaysBand4
  return null
}

/** The due date of a work order raised today for findings of these bands. */
export function repairDueOn(bands: ReadonlyArray<number | null | undefined>, d: RepairDeadlines, today: string): string | null {
  const days = repairDaysFor(mostSevereBand(bands), d)
  return days === null ? null : addDays(today, days)
}

/** The earlier of two optional dates (YYYY-MM-DD compare as strings). */
export function earlierDate(a: string | null, b: string | null): string | null {
  if (!a) return b
  if (!b) return a
  return a <= b ? a : b
}

/** States in which the due date still binds someone (awaiting verification waits on the thermographer, not the crew). */
const DUE_BINDS: readonly WorkOrderStateName[] = ['open', 'planned', 'in_repair', 'deferred']

/** Past its due date and still someone's to do. */
export function isOverdue(state: WorkOrderStateName, dueOn: string | null, today: string): boolean {
  return !!dueOn && DUE_BINDS.includes(state) && dueOn < today
}

/** "WO-<number>". */
export function workOrderReference(n: number): string {
  return `WO-${n}`
}
