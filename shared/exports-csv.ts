// The CSV columns of the findings and checks exports: the export code writes exactly these, in this order, and
// the README prints the same list. Temperatures are always °C and rises K here (whatever a person's display
// units), so that a file reads the same for every machine that consumes it.
import type { FindingListItem } from './types/survey'
import type { CheckListItem } from './types/checks'
import type { WorkOrderListItem } from './types/work-order'

export interface ExportColumn<T> {
  name: string
  type: 'text' | 'number' | 'whole number' | 'date' | 'date-time' | 'choice' | 'list'
  description: string
  value: (row: T) => string | number | null
}

type F = FindingListItem

export const FINDING_CSV_COLUMNS: ReadonlyArray<ExportColumn<F>> = [
  { name: 'finding_id', type: 'text', description: 'Identifier of the finding (UUID).', value: (f) => f.id },
  { name: 'survey_id', type: 'text', description: 'Identifier of the survey it was recorded in.', value: (f) => f.surveyId },
  { name: 'survey_date', type: 'date', description: 'Planned date of that survey (YYYY-MM-DD).', value: (f) => f.plannedFor },
  { name: 'site', type: 'text', description: 'Name of the site.', value: (f) => f.siteName },
  { name: 'asset_id', type: 'text', description: 'Identifier of the asset.', value: (f) => f.assetId },
  { name: 'asset', type: 'text', description: 'Label of the asset within its site.', value: (f) => f.assetLabel },
  { name: 'component', type: 'text', description: 'Component that was hot (e.g. line-side connector).', value: (f) => f.component },
  { name: 'phase', type: 'text', description: 'Phase, blank when not given.', value: (f) => f.phase },
  { name: 'apparent_c', type: 'number', description: 'Apparent hot-spot temperature as read, °C.', value: (f) => f.inputs.apparentC },
  { name: 'reference_c', type: 'number', description: 'Apparent temperature of the similar component under similar load, °C.', value: (f) => f.inputs.referenceC },
  { name: 'ambient_c', type: 'number', description: 'Ambient air temperature, °C.', value: (f) => f.inputs.ambientC },
  { name: 'emissivity', type: 'number', description: 'Emissivity used (0–1).', value: (f) => f.inputs.emissivity },
  { name: 'reflected_c', type: 'number', description: 'Reflected apparent temperature, °C.', value: (f) => f.inputs.reflectedC },
  { name: 'reflected_method', type: 'choice', description: 'How the reflected temperature was found: reflector, direct or estimated.', value: (f) => f.inputs.reflectedMethod },
  { name: 'distance_m', type: 'number', description: 'Distance to the target, m.', value: (f) => f.inputs.distanceM },
  { name: 'load_a', type: 'number', description: 'Load at the time of the reading, A.', value: (f) => f.inputs.loadA },
  { name: 'rated_a', type: 'number', description: 'Rated current, A.', value: (f) => f.inputs.ratedA },
  { name: 'wind_ms', type: 'number', description: 'Wind speed, m/s.', value: (f) => f.inputs.windMs },
  { name: 'object_c', type: 'number', description: 'Corrected object temperature computed by Greybody, °C.', value: (f) => f.objectC },
  { name: 'uncertainty_low_c', type: 'number', description: 'Low end of the object temperature interval, °C.', value: (f) => f.uncertaintyLowC },
  { name: 'uncertainty_high_c', type: 'number', description: 'High end of the object temperature interval, °C.', value: (f) => f.uncertaintyHighC },
  { name: 'rise_over_reference_k', type: 'number', description: 'Measured rise over the reference, K.', value: (f) => f.riseOverReferenceK },
  { name: 'rise_over_ambient_k', type: 'number', description: 'Measured rise over ambient, K.', value: (f) => f.riseOverAmbientK },
  { name: 'load_scaled_rise_k', type: 'number', description: 'Rise scaled to rated load, K (blank without load and rating).', value: (f) => f.loadScaledRiseK },
  { name: 'computed_band', type: 'whole number', description: 'Band the engine computed, 1 (most severe) to 4; blank when not ranked.', value: (f) => f.band },
  { name: 'band', type: 'whole number', description: 'Band in force: the reviewed band when a manager corrected it, else the computed band.', value: (f) => f.effectiveBand ?? f.band },
  { name: 'band_basis', type: 'choice', description: 'Comparison the band came from: overReference, overAmbient or absolute.', value: (f) => f.bandBasis },
  { name: 'review_reason', type: 'text', description: 'Why a manager corrected the band, blank when not corrected.', value: (f) => f.review?.reason ?? '' },
  { name: 'action', type: 'text', description: 'Recommended action of the band (criteria-set wording).', value: (f) => f.action },
  { name: 'repair_deadline_days', type: 'whole number', description: 'Default repair deadline of the band, days; blank = record and trend.', value: (f) => f.repairDeadlineDays },
  { name: 'probable_cause', type: 'choice', description: 'Probable cause code (e.g. loose_connection).', value: (f) => f.probableCause },
  { name: 'cause_notes', type: 'text', description: 'Notes on the probable cause.', value: (f) => f.causeNotes },
  { name: 'notes', type: 'text', description: 'Notes of the thermographer.', value: (f) => f.notes },
  { name: 'warnings', type: 'list', description: 'Validity warning codes, separated by ";".', value: (f) => f.warnings.map((w) => w.code).join(';') },
  { name: 'criteria_id', type: 'text', description: 'Criteria set the finding was ranked with.', value: (f) => f.criteriaId },
  { name: 'criteria_version', type: 'whole number', description: 'Version of that criteria set.', value: (f) => f.criteriaVersion },
  { name: 'closed_at', type: 'date-time', description: 'When the finding was closed (ISO 8601, UTC), blank while open.', value: (f) => f.closedAt ?? '' },
]

export const CHECK_CSV_COLUMNS: ReadonlyArray<ExportColumn<CheckListItem>> = [
  { name: 'check_id', type: 'text', description: 'Identifier of the check (UUID).', value: (c) => c.id },
  { name: 'survey_id', type: 'text', description: 'Identifier of the survey.', value: (c) => c.surveyId },
  { name: 'survey_date', type: 'date', description: 'Planned date of the survey (YYYY-MM-DD).', value: (c) => c.plannedFor },
  { name: 'site_code', type: 'text', description: 'Code of the site.', value: (c) => c.siteCode },
  { name: 'site', type: 'text', description: 'Name of the site.', value: (c) => c.siteName },
  { name: 'asset_id', type: 'text', description: 'Identifier of the asset.', value: (c) => c.assetId },
  { name: 'asset', type: 'text', description: 'Label of the asset within its site.', value: (c) => c.assetLabel },
  { name: 'outcome', type: 'choice', description: 'clear, finding or not_reached.', value: (c) => c.outcome },
  { name: 'reason', type: 'choice', description: 'Why the asset was not reached (no_access, de_energised, outage, unsafe, other); blank otherwise.', value: (c) => c.reason },
  { name: 'note', type: 'text', description: 'Note recorded with the check.', value: (c) => c.note },
  { name: 'checked_by', type: 'text', description: 'Name of the person who recorded the check.', value: (c) => c.checkedBy },
  { name: 'checked_at', type: 'date-time', description: 'When the check was recorded (ISO 8601, UTC).', value: (c) => c.checkedAt },
  { name: 'finding_count', type: 'whole number', description: 'Findings recorded at this check.', value: (c) => c.findingCount },
]

export const WORK_ORDER_CSV_COLUMNS: ReadonlyArray<ExportColumn<WorkOrderListItem>> = [
  { name: 'work_order_id', type: 'text', description: 'Identifier of the work order (UUID).', value: (w) => w.id },
  { name: 'reference', type: 'text', description: 'Reference people quote, WO-<number>.', value: (w) => w.reference },
  { name: 'title', type: 'text', description: 'Title of the work order.', value: (w) => w.title },
  { name: 'state', type: 'choice', description: 'open, planned, in_repair, awaiting_verification, closed, deferred or cancelled.', value: (w) => w.state },
  { name: 'band', type: 'whole number', description: 'Most severe band in force of its findings, 1 to 4; blank when none is ranked.', value: (w) => w.band },
  { name: 'due_on', type: 'date', description: 'Repair due date (YYYY-MM-DD); blank = record and trend, no deadline.', value: (w) => w.dueOn },
  { name: 'overdue', type: 'choice', description: 'yes when past its due date and still waiting for someone, else no.', value: (w) => (w.overdue ? 'yes' : 'no') },
  { name: 'deferred_until', type: 'date', description: 'While deferred: the date the repair waits until.', value: (w) => w.deferredUntil },
  { name: 'state_reason', type: 'text', description: 'Reason given with the last defer, cancel or reopen.', value: (w) => w.stateReason },
  { name: 'site_code', type: 'text', description: 'Code of the site.', value: (w) => w.site.code },
  { name: 'site', type: 'text', description: 'Name of the site.', value: (w) => w.site.name },
  { name: 'assignees', type: 'list', description: 'Names of the people assigned, separated by ";".', value: (w) => w.assignees.map((p) => p.name).join(';') },
  { name: 'finding_count', type: 'whole number', description: 'Findings the work order covers.', value: (w) => w.findingCount },
  { name: 'created_at', type: 'date-time', description: 'When it was raised (ISO 8601, UTC).', value: (w) => w.createdAt },
  { name: 'updated_at', type: 'date-time', description: 'Last change (ISO 8601, UTC).', value: (w) => w.updatedAt },
]
