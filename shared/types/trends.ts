import type { Trend } from '../trends'

/** The trend of one component (and phase) of an asset. */
export interface ComponentTrend extends Trend {
  component: string
  phase: string
  criteriaId: string
  criteriaName: string
}

export interface AssetTrends {
  assetId: string
  assetLabel: string
  components: ComponentTrend[]
}
