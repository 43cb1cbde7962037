import type { Band } from './planck'

/** A named imager band for pickers. */
export interface ImagerBand {
  id: 'lwir' | 'lwir-8-14' | 'mwir'
  label: string
  band: Band
  note: string
}

/** Common imager bands (reference sheet §3, common practice). */
export const IMAGER_BANDS: readonly ImagerBand[] = [
  { id: 'lwir', label: 'LWIR 7.5–14 µm', band: { fromUm: 7.5, toUm: 14 }, note: 'Uncooled microbolometer' },
  { id: 'lwir-8-14', label: 'LWIR 8–14 µm', band: { fromUm: 8, toUm: 14 }, note: 'Uncooled microbolometer, as often quoted' },
  { id: 'mwir', label: 'MWIR 3–5 µm', band: { fromUm: 3, toUm: 5 }, note: 'Cooled InSb or MCT detector' },
]
