import type { GridRegion } from '../thermal/grid'

/** A temperature grid as the API returns it (the values come separately, as little-endian Float32 °C). */
export interface TemperatureGridMeta {
  id: string
  surveyId: string
  assetId: string
  findingId: string | null
  width: number
  height: number
  /** Unit the uploaded file was in; values are stored in °C. */
  sourceUnit: 'C' | 'F'
  fileName: string
  minC: number
  maxC: number
  hotRegion: GridRegion | null
  referenceRegion: GridRegion | null
  /** The survey instrument's band, for re-correcting the grid with correctFrame. */
  band: { fromUm: number; toUm: number }
  createdAt: string
}
