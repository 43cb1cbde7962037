import type { ReadingWarning } from '../thermal/index'
import type { CheckOutcome, NotReachedReason, SurveyStateName } from '../schemas/survey'
import type { FindingExtras } from './finding'

// API objects of surveys, checks and findings (camelCase, °C, metres).

export interface SurveyListItem {
  id: string
  plannedFor: string
  state: SurveyStateName
  route: { id: string; name: string } | null
  thermographer: { id: string; name: string }
  instrument: { id: string; label: string }
  siteCount: number
  assetCount: number
  checkedCount: number
  findingCount: number
  version: number
  updatedAt: string
}

export interface SurveyFinding extends FindingExtras {
  id: string
  checkId: string
  assetId: string
  component: string
  phase: string
  inputs: {
    apparentC: number; referenceC: number | null; ambientC: number | null; emissivity: number; reflectedC: number
    reflectedMethod: string; distanceM: number | null; transmittance: number | null; windowTransmittance: number | null
    windowC: number | null; loadA: number | null; ratedA: number | null; windMs: number | null
  }
  probableCause: string
  causeNotes: string
  notes: string
  objectC: number
  riseOverReferenceK: number | null
  riseOverAmbientK: number | null
  loadScaledRiseK: number | null
  band: number | null
  bandBasis: string | null
  action: string
  repairDeadlineDays: number | null
  uncertaintyLowC: number | null
  uncertaintyHighC: number | null
  warnings: ReadingWarning[]
  criteriaId: string
  criteriaVersion: number
  version: number
}

export interface SurveyCheck {
  id: string
  assetId: string
  outcome: CheckOutcome
  reason: NotReachedReason | null
  note: string
  version: number
}

export interface SurveyAsset {
  id: string
  label: string
  assetClass: string
  ratedCurrentA: number | null
  check: SurveyCheck | null
  findings: SurveyFinding[]
}

export interface SurveySite {
  id: string
  siteId: string
  position: number
  code: string
  name: string
  safetyFlags: string[]
  safetyNotes: string
  conditions: { ambientC: number | null; windMs: number | null; humidityPct: number | null; sky: string | null; loadNotes: string }
  assets: SurveyAsset[]
}

export interface SurveyDetail extends SurveyListItem {
  reviewComments: string
  instrumentBand: { fromUm: number; toUm: number; accuracyK: number | null; accuracyPct: number | null; ifovMrad: number | null; calibrationDue: string | null }
  sites: SurveySite[]
  /** Assets planned, clear, with findings and not reached: the survey's coverage. */
  summary: { assets: number; clear: number; finding: number; notReached: number; unchecked: number; byBand: Record<string, number> }
  /** Whether the signed-in person is the assigned thermographer. */
  assignedToMe: boolean
}

export interface FindingListItem extends SurveyFinding {
  surveyId: string
  plannedFor: string
  siteName: string
  assetLabel: string
}
