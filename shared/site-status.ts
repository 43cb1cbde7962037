// How a site is drawn on the map: its colour follows the worst band among its open findings, and an overdue
// asset adds a mark. Findings arrive with a later feature; until then every site has no open finding.
import type { Band } from './schedule'

/** Severity colours: stops of the open inferno colour map (band 1 = most severe). */
export const BAND_COLOURS: Record<Band, string> = { 1: '#A52C60', 2: '#E35933', 3: '#FB9B06', 4: '#F6D746' }
/** No open finding: slate. */
export const CLEAR_COLOUR = '#64748b'

export interface SiteStatusInput {
  /** Worst (lowest-numbered) band among the site's open findings; null when it has none. */
  worstBand: Band | null
  /** Assets whose next check is before today. */
  overdue: number
}

export interface SiteMarkerStyle {
  fill: string
  /** Darker, thicker ring when something is overdue. */
  stroke: string
  weight: number
  dashArray?: string
  label: string
}

/** The marker style and its words (the colour never carries meaning alone). */
export function siteMarkerStyle(status: SiteStatusInput): SiteMarkerStyle {
  const fill = status.worstBand ? BAND_COLOURS[status.worstBand] : CLEAR_COLOUR
  const findings = status.worstBand ? `worst open finding band ${status.worstBand}` : 'no open findings'
  if (status.overdue > 0) {
    return { fill, stroke: '#1c1917', weight: 4, dashArray: '4 3', label: `${findings}; ${status.overdue} overdue` }
  }
  return { fill, stroke: '#ffffff', weight: 2, label: findings }
}
