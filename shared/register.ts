/** Equipment classes of the asset register (product.md). */
export const ASSET_CLASSES = [
  'transformer', 'breaker', 'disconnect', 'bus', 'cable_termination', 'instrument_transformer', 'surge_arrester',
  'recloser', 'capacitor_bank', 'switchgear', 'mcc', 'panelboard', 'line_connector', 'insulator',
] as const
export type AssetClass = (typeof ASSET_CLASSES)[number]

export const ASSET_CLASS_LABELS: Record<AssetClass, string> = {
  transformer: 'Transformer', breaker: 'Breaker', disconnect: 'Disconnect', bus: 'Bus',
  cable_termination: 'Cable termination', instrument_transformer: 'Instrument transformer', surge_arrester: 'Surge arrester',
  recloser: 'Recloser', capacitor_bank: 'Capacitor bank', switchgear: 'Switchgear', mcc: 'Motor control centre',
  panelboard: 'Panelboard', line_connector: 'Line connector', insulator: 'Insulator',
}

export const SITE_KINDS = ['substation', 'switchyard', 'plant_room', 'line_section'] as const
export type SiteKind = (typeof SITE_KINDS)[number]

export const SITE_KIND_LABELS: Record<SiteKind, string> = {
  substation: 'Substation', switchyard: 'Switchyard', plant_room: 'Plant room', line_section: 'Line section',
}

/** Safety facts a thermographer must know before visiting a site; shown as badges beside the free-text notes. */
export const SITE_SAFETY_FLAGS = ['permit_required', 'work_in_pairs', 'escort_required', 'ir_windows', 'confined_space'] as const
export type SiteSafetyFlag = (typeof SITE_SAFETY_FLAGS)[number]

export const SITE_SAFETY_FLAG_LABELS: Record<SiteSafetyFlag, string> = {
  permit_required: 'Switching or access permit needed',
  work_in_pairs: 'Work in pairs',
  escort_required: 'Escort needed on site',
  ir_windows: 'IR windows fitted',
  confined_space: 'Confined space entry',
}

/** Criticality of an asset to the network, 1 (low) to 5 (highest). */
export const CRITICALITY_LABELS: Record<number, string> = { 1: 'Low', 2: 'Moderate', 3: 'Significant', 4: 'High', 5: 'Highest' }

/** Equipment condition as NFPA 70B (2023) grades it: 1 good, 2 fair, 3 poor. */
export const CONDITION_LABELS: Record<number, string> = { 1: 'Good', 2: 'Fair', 3: 'Poor' }

/** Components or phases to check when none are given. */
export const DEFAULT_COMPONENTS = ['A', 'B', 'C'] as const
