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
