import type { CheckOutcome, NotReachedReason, SurveyStateName } from '../schemas/survey'

/** A manager's correction of the band the engine computed; the computed band stays beside it. */
export interface FindingReview {
  band: number
  reason: string
  by: { id: string; name: string } | null
  at: string
}

/** Review, closing and surface details every finding carries (added to SurveyFinding). */
export interface FindingExtras {
  /** The band lists use: the reviewed band when a manager corrected it, else the computed one. */
  effectiveBand: number | null
  review: FindingReview | null
  closedAt: string | null
  surfaceId: string | null
}

/** One entry of an asset's history: a check of a survey, with the findings recorded at it. */
export interface AssetHistoryItem {
  checkId: string
  surveyId: string
  surveyState: SurveyStateName
  plannedFor: string
  checkedAt: string
  outcome: CheckOutcome
  reason: NotReachedReason | null
  note: string
  checkedBy: string | null
  findings: Array<{
    id: string
    component: string
    phase: string
    objectC: number
    band: number | null
    effectiveBand: number | null
    corrected: boolean
    action: string
    closedAt: string | null
  }>
}
