// Survey reports (PDF): the words and states shared by the server, the report itself and the pages.

/** The disclaimer every report carries, in our own words (reference sheet §7). */
export const REPORT_DISCLAIMER =
  'This report supports, and does not replace, the judgement of qualified people: the thermographer who took the readings, ' +
  'the engineers who decide on repairs, and the site’s electrical safety programme. Temperatures, rises and bands are computed ' +
  'from the readings as recorded and carry the uncertainty of those readings. Defer to local codes and licensed practice.'

export const REPORT_STATES = ['queued', 'running', 'ready', 'failed'] as const
export type ReportState = (typeof REPORT_STATES)[number]

export const REPORT_STATE_LABELS: Record<ReportState, string> = {
  queued: 'Waiting to start',
  running: 'Being made',
  ready: 'Ready',
  failed: 'Could not be made',
}

/** Work-order states as the report prints them (product vocabulary). */
export const REPORT_WORK_ORDER_STATE_LABELS: Record<string, string> = {
  open: 'open',
  planned: 'planned',
  in_repair: 'in repair',
  awaiting_verification: 'awaiting verification',
  closed: 'closed',
  deferred: 'deferred',
  cancelled: 'cancelled',
}

/** The file name a report downloads as: organisation, survey date, short id (no spaces or odd characters). */
export function reportFileName(orgSlug: string, surveyDate: string, reportId: string): string {
  return `greybody-${orgSlug}-survey-${surveyDate}-${reportId.slice(0, 8)}.pdf`.replace(/[^A-Za-z0-9._-]/g, '_')
}
