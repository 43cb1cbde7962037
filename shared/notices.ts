// Kinds of notice, their names for people, and the outbox retry schedule. Shared by server, pages and unit tests.

/** Every kind of notice Greybody sends. Preferences are kept per person, organisation and kind. */
export const NOTICE_KINDS = [
  'survey_due',
  'survey_overdue',
  'work_order_due',
  'work_order_overdue',
  'work_order_assigned',
  'work_order_reopened',
  'verification_waiting',
  'calibration_due',
  'finding_band1',
] as const
export type NoticeKind = (typeof NOTICE_KINDS)[number]

export const NOTICE_KIND_LABELS: Record<NoticeKind, string> = {
  survey_due: 'Surveys due within 14 days',
  survey_overdue: 'Surveys past their planned date',
  work_order_due: 'Work orders due within 3 days',
  work_order_overdue: 'Work orders past their due date',
  work_order_assigned: 'Work orders assigned to you',
  work_order_reopened: 'Work orders reopened after a verification',
  verification_waiting: 'Verifications waiting for a re-scan',
  calibration_due: 'Instrument calibrations due within 30 days',
  finding_band1: 'Band 1 findings, as soon as they are saved',
}

export function isNoticeKind(v: unknown): v is NoticeKind {
  return typeof v === 'string' && (NOTICE_KINDS as readonly string[]).includes(v)
}

/** How far ahead the daily jobs look (days). */
export const SURVEY_DUE_WITHIN_DAYS = 14
export const WORK_ORDER_DUE_WITHIN_DAYS = 3
export const CALIBRATION_DUE_WITHIN_DAYS = 30

/** Attempts after which an outbox message is given up as failed (the last reason is kept). */
export const OUTBOX_MAX_ATTEMPTS = 8
/** Longest wait between two attempts, in minutes. */
export const OUTBOX_MAX_DELAY_MINUTES = 60

/**
 * Minutes to wait after the n-th failed attempt (n ≥ 1): 1, 2, 4, 8 … doubling, capped at 60.
 * Exponential back-off with a cap is common practice for retrying a mail relay.
 */
export function outboxRetryDelayMinutes(failedAttempts: number): number {
  const n = Math.max(1, Math.floor(failedAttempts))
  return Math.min(OUTBOX_MAX_DELAY_MINUTES, 2 ** (n - 1))
}

/** After a failed attempt: the next state and when to try again (null when given up). `unitMs` is one "minute" of the schedule. */
export function afterFailure(
  failedAttempts: number,
  now: Date,
  opts: { maxAttempts?: number; unitMs?: number } = {},
): { state: 'waiting' | 'failed'; nextAttemptAt: Date | null } {
  const maxAttempts = opts.maxAttempts ?? OUTBOX_MAX_ATTEMPTS
  const unitMs = opts.unitMs ?? 60_000
  if (failedAttempts >= maxAttempts) return { state: 'failed', nextAttemptAt: null }
  return { state: 'waiting', nextAttemptAt: new Date(now.getTime() + outboxRetryDelayMinutes(failedAttempts) * unitMs) }
}
