// Shapes of the JSON the dashboard routes answer (dates are ISO strings YYYY-MM-DD).
import type { AgeBucketKey, BacklogState } from '../dashboard'

export type AgeCounts = Record<AgeBucketKey, number>

export interface CoverageCounts {
  due: number
  onTime: number
  late: number
  missed: number
  /** onTime ÷ due, 0..1; null when nothing was due. */
  rate: number | null
}

export interface CoverageSite extends CoverageCounts {
  siteId: string
  code: string | null
  name: string
}

export interface OverdueSite {
  siteId: string
  code: string | null
  name: string
  assets: number
}

/** GET /api/orgs/:org/dashboard */
export interface DashboardFigures {
  today: string
  from: string
  to: string
  siteIds: string[]
  /** sites: at most 25, the least covered when there are more (siteCount: how many sites had something due). */
  coverage: CoverageCounts & { siteCount: number; sites: CoverageSite[] }
  /** bySite: the 5 sites with the most overdue assets (sites: how many have any). */
  overdue: { assets: number; sites: number; bySite: OverdueSite[] }
  openFindings: { total: number; byBand: Array<{ band: 1 | 2 | 3 | 4 | null; total: number; ages: AgeCounts }> }
  findingsPer100: { findings: number; assetsChecked: number; rate: number | null }
  repeats: { findings: number; components: number }
  /** null when the work-order tables are not there (older database). */
  workOrders: {
    backlog: number
    ageing: Array<{ state: BacklogState; total: number; ages: AgeCounts }>
    timeToRepair: Array<{ band: 1 | 2 | 3 | 4 | null; repaired: number; medianDays: number | null }>
    verification: { recorded: number; passed: number; failed: number; rate: number | null }
  } | null
}

/** GET /api/orgs/:org/dashboard/coverage */
export interface CoverageAssetRow {
  id: string
  label: string
  assetClass: string
  siteId: string
  siteCode: string | null
  siteName: string
  /** Due date from the last check before the period; null for an asset never checked before (due by the period end). */
  dueOn: string | null
  lastBefore: string | null
  firstCheckedOn: string | null
  status: 'on_time' | 'late' | 'missed'
}

/** GET /api/orgs/:org/dashboard/repeats */
export interface RepeatComponentRow {
  assetId: string
  assetLabel: string
  siteId: string
  siteName: string
  component: string
  phase: string
  /** Findings on this component at any time. */
  findings: number
  /** Of which repeats found in the period. */
  repeatsInPeriod: number
  firstFoundOn: string
  lastFoundOn: string
  lastBand: 1 | 2 | 3 | 4 | null
}

/** GET /api/orgs/:org/dashboard/verifications */
export interface VerificationRow {
  id: string
  result: 'passed' | 'failed'
  recordedOn: string
  findingId: string
  component: string
  phase: string
  band: 1 | 2 | 3 | 4 | null
  foundOn: string
  assetId: string
  assetLabel: string
  siteName: string
  workOrderId: string
  workOrderNumber: number
  /** The finding's first passed re-scan: the repair the median counts, with its days from finding to verification. */
  firstPass: boolean
  days: number
}
