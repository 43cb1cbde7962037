import type { CheckOutcome, NotReachedReason } from '../schemas/survey'

/** One check in the organisation's checks list (and a row of its CSV export). */
export interface CheckListItem {
  id: string
  surveyId: string
  plannedFor: string
  siteId: string
  siteCode: string
  siteName: string
  assetId: string
  assetLabel: string
  outcome: CheckOutcome
  reason: NotReachedReason | null
  note: string
  checkedBy: string | null
  checkedAt: string
  findingCount: number
}
