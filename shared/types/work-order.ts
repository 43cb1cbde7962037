import type { ReadingWarning } from '../thermal/index'
import type { VerificationStateName, WorkOrderStateName } from '../schemas/work-order'

// API objects of work orders, verifications and the timeline (camelCase, °C, metres, dates as YYYY-MM-DD).

export interface PersonRef { id: string; name: string }

export interface WorkOrderSiteRef {
  id: string
  code: string
  name: string
  latitude: number | null
  longitude: number | null
}

export interface WorkOrderListItem {
  id: string
  number: number
  /** "WO-<number>", the reference people quote. */
  reference: string
  title: string
  state: WorkOrderStateName
  /** Most severe effective band of its findings (1 = most severe); null = none ranked. */
  band: number | null
  dueOn: string | null
  /** Past its due date and still waiting for someone (not closed, cancelled or awaiting verification). */
  overdue: boolean
  deferredUntil: string | null
  stateReason: string
  site: WorkOrderSiteRef
  assignees: PersonRef[]
  findingCount: number
  createdAt: string
  updatedAt: string
  version: number
}

/** A reading's inputs and what the engine computed, as findings and verifications both carry them. */
export interface ReadingSummary {
  apparentC: number
  referenceC: number | null
  ambientC: number | null
  emissivity: number
  reflectedC: number
  reflectedMethod: string
  distanceM: number | null
  loadA: number | null
  ratedA: number | null
  windMs: number | null
  objectC: number
  riseOverReferenceK: number | null
  riseOverAmbientK: number | null
  loadScaledRiseK: number | null
  band: number | null
  bandBasis: string | null
  uncertaintyLowC: number | null
  uncertaintyHighC: number | null
  warnings: ReadingWarning[]
  criteriaId: string
  criteriaVersion: number
}

export interface WorkOrderFindingItem {
  id: string
  component: string
  phase: string
  asset: { id: string; label: string }
  surveyId: string
  surveyedOn: string
  probableCause: string
  causeNotes: string
  notes: string
  action: string
  /** Band as the engine computed it, and the band lists use (a manager's correction when there is one). */
  band: number | null
  effectiveBand: number | null
  reading: ReadingSummary
  closedAt: string | null
  closedReason: string | null
}

export interface VerificationItem {
  id: string
  workOrder: { id: string; reference: string; title: string; state: WorkOrderStateName }
  finding: { id: string; component: string; phase: string; assetLabel: string; band: number | null; effectiveBand: number | null; reading: ReadingSummary }
  site: WorkOrderSiteRef
  state: VerificationStateName
  thermographer: PersonRef | null
  surveyId: string | null
  instrument: { id: string; label: string } | null
  reading: ReadingSummary | null
  notes: string
  recordedBy: PersonRef | null
  recordedAt: string | null
  createdAt: string
  version: number
}

export interface TimelineEntry {
  id: string
  at: string
  actor: PersonRef | null
  subjectKind: 'finding' | 'work_order' | 'verification'
  subjectId: string
  action: string
  /** What happened, in a sentence. */
  summary: string
  reason: string
  details: Record<string, unknown>
}

export interface WorkOrderDetail extends WorkOrderListItem {
  instructions: string
  causeFound: string
  parts: string
  workDone: string
  timeSpentMinutes: number | null
  createdBy: PersonRef | null
  closedAt: string | null
  findings: WorkOrderFindingItem[]
  verifications: VerificationItem[]
  timeline: TimelineEntry[]
  assignedToMe: boolean
}

/** Open findings not yet in an active work order, grouped by site: what a manager can raise from. */
export interface RaiseCandidateSite {
  site: WorkOrderSiteRef
  findings: WorkOrderFindingItem[]
}

export interface WorkOrderPeople {
  crew: Array<PersonRef & { role: string }>
  thermographers: Array<PersonRef & { role: string }>
}

export interface RepairDeadlines {
  repairDaysBand1: number | null
  repairDaysBand2: number | null
  repairDaysBand3: number | null
  repairDaysBand4: number | null
}
