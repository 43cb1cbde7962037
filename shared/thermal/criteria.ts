/** Band number of a criteria set: 1 is the most severe. */
export type BandNumber = 1 | 2 | 3 | 4

/** How sure a figure is, as tagged in the reference sheet. */
export type Provenance = 'published' | 'secondary' | 'from memory' | 'common practice' | 'tenant'

/** One band of one comparison: values above the previous band's upper edge and up to `upTo` (inclusive). */
export interface CriteriaBand {
  band: BandNumber
  /** Inclusive upper edge (K for rises, °C for absolute limits); null = no upper edge. */
  upTo: number | null
  /** What to do, in our own words. */
  action: string
  /** Default repair deadline in days; null = record and trend, no deadline. */
  repairDeadlineDays: number | null
}

/** The bands of one comparison, least severe first. */
export interface CriteriaComparison {
  /** Smallest value that is ranked at all (inclusive); below it the value is not ranked. */
  minimum: number
  bands: CriteriaBand[]
}

/** A criteria set: data, so that a tenant can define and version its own. */
export interface CriteriaSet {
  id: string
  name: string
  version: number
  source: string
  provenance: Provenance
  notes?: string
  /** Rise of the hot spot over a similar component under similar load, K. */
  overReference?: CriteriaComparison
  /** Rise of the hot spot over ambient air, K. */
  overAmbient?: CriteriaComparison
  /** Absolute object temperature, °C. */
  absoluteLimitsC?: CriteriaComparison
}

/** Which comparison a band came from. */
export type RankBasis = 'overReference' | 'overAmbient' | 'absolute'

/** Result of ranking one finding against a criteria set. */
export interface RankResult {
  band: BandNumber | null
  basis: RankBasis | null
  action: string
  repairDeadlineDays: number | null
  /** Band of each comparison that was given a value (null = given but below the lowest band). */
  byComparison: Partial<Record<RankBasis, BandNumber | null>>
  criteriaId: string
  criteriaVersion: number
}

/** Differences below this are floating-point noise from subtracting temperatures, not a real excess. */
const EDGE_TOLERANCE = 1e-9

// Default deadlines from reference sheet §6 (common practice; tenants override them):
// band 1 immediately (within a day), band 2 about 30 days, band 3 at the next scheduled maintenance
// (taken as 180 days, the short end of 6–12 months), band 4 record and trend.
const DEADLINE: Record<BandNumber, number | null> = { 1: 1, 2: 30, 3: 180, 4: null }

// Actions paraphrase ANSI/NETA Table 100.18 in our own words.
const NETA_ACTION: Record<BandNumber, string> = {
  4: 'Possible problem. Look into it and record it; compare again at the next survey.',
  3: 'Likely problem. Plan the repair and carry it out when the schedule allows.',
  2: 'Keep it under close watch until a repair can be made; plan the repair now.',
  1: 'Serious problem. Arrange the repair as soon as it can be done safely.',
}

function bandsOf(edges: Array<[BandNumber, number | null]>, actions: Record<BandNumber, string>): CriteriaBand[] {
  return edges.map(([band, upTo]) => ({ band, upTo, action: actions[band], repairDeadlineDays: DEADLINE[band] }))
}

/** ANSI/NETA Table 100.18 (ATS/MTS) as a criteria set; the default. */
export const NETA_100_18: CriteriaSet = {
  id: 'neta-100-18',
  name: 'ANSI/NETA Table 100.18',
  version: 1,
  source: 'ANSI/NETA ATS and MTS, Table 100.18 (suggested actions based on temperature rise)',
  provenance: 'published',
  notes:
    'The table gives integer edges; here a band starts just above the previous band’s upper edge ' +
    '(over reference: 1–3 → 4, above 3 to 15 → 3, above 15 → 1; over ambient: 1–10 → 4, above 10 to 20 → 3, ' +
    'above 20 to 40 → 2, above 40 → 1). Rises below 1 K are not ranked. When both comparisons are given ' +
    'the more severe band governs.',
  overReference: { minimum: 1, bands: bandsOf([[4, 3], [3, 15], [1, null]], NETA_ACTION) },
  overAmbient: { minimum: 1, bands: bandsOf([[4, 10], [3, 20], [2, 40], [1, null]], NETA_ACTION) },
}

/** MIL-STD-2194(SH) shipboard survey bands; edges and comparison basis from memory. */
export const MIL_STD_2194: CriteriaSet = {
  id: 'mil-std-2194',
  name: 'MIL-STD-2194(SH)',
  version: 1,
  source: 'MIL-STD-2194(SH), infrared thermal imaging survey procedure for shipboard electrical equipment',
  provenance: 'from memory',
  notes:
    'Edges as remembered from the standard (10–24, 25–39, 40–69, 70 and above, °C rise); unverified. ' +
    'Applied to the rise over ambient. Values between the written integer edges go to the more severe band.',
  overAmbient: {
    minimum: 10,
    bands: bandsOf([[4, 24], [3, 39], [2, 69], [1, null]], {
      4: 'Failure unlikely. Correct at the next routine maintenance.',
      3: 'Failure probable unless corrected. Plan the repair.',
      2: 'Failure almost certain unless corrected. Repair soon.',
      1: 'Failure imminent. Repair as soon as it can be done safely.',
    }),
  },
}

const GRADE_ACTION: Record<BandNumber, string> = {
  4: 'Record only.',
  3: 'Record and watch at the next survey.',
  2: 'Schedule the repair.',
  1: 'Repair straight away, as soon as it can be done safely.',
}

/** Distribution-utility guideline for overhead equipment (three grades). */
export const DISTRIBUTION_OVERHEAD: CriteriaSet = {
  id: 'distribution-overhead',
  name: 'Distribution utility guideline — overhead',
  version: 1,
  source: 'Distribution-utility guideline, overhead equipment, as reproduced in a training manual',
  provenance: 'published',
  notes:
    'Grades 3, 2, 1 map to bands 3, 2, 1. The source gives the rise without its basis; applied here to the ' +
    'rise over a similar component.',
  overReference: { minimum: 14, bands: bandsOf([[3, 20], [2, 60], [1, null]], GRADE_ACTION) },
}

/** Distribution-utility guideline for underground equipment (three grades). */
export const DISTRIBUTION_UNDERGROUND: CriteriaSet = {
  id: 'distribution-underground',
  name: 'Distribution utility guideline — underground',
  version: 1,
  source: 'Distribution-utility guideline, underground equipment, as reproduced in a training manual',
  provenance: 'published',
  notes: 'Grades 3, 2, 1 map to bands 3, 2, 1. Applied to the rise over a similar component.',
  overReference: { minimum: 2, bands: bandsOf([[3, 4], [2, 10], [1, null]], GRADE_ACTION) },
}

/** A generic three-level chart (minor, serious, critical). */
export const GENERIC_THREE_LEVEL: CriteriaSet = {
  id: 'generic-three-level',
  name: 'Generic three-level chart',
  version: 1,
  source: 'Generic three-level temperature-rise chart, as reproduced in a training manual',
  provenance: 'published',
  notes: 'Minor, serious, critical map to bands 3, 2, 1. Applied to the rise over a similar component.',
  overReference: {
    minimum: 10,
    bands: bandsOf([[3, 20], [2, 49], [1, null]], {
      ...GRADE_ACTION,
      3: 'Minor. Repair at the next planned maintenance.',
      2: 'Serious. Schedule the repair soon.',
      1: 'Critical. Repair as soon as it can be done safely.',
    }),
  },
}

/** The published sets a tenant can start from, default first. */
export const CRITERIA_SETS: readonly CriteriaSet[] = [
  NETA_100_18,
  MIL_STD_2194,
  DISTRIBUTION_OVERHEAD,
  DISTRIBUTION_UNDERGROUND,
  GENERIC_THREE_LEVEL,
]

/** A criteria set by id, or the default when the id is unknown. */
export function criteriaSetById(id: string | undefined): CriteriaSet {
  return CRITERIA_SETS.find((s) => s.id === id) ?? NETA_100_18
}

/** Maximum temperatures of parts (ambient ≤ 40 °C), for absolute-limit checks. */
export interface TemperatureLimit {
  id: string
  part: string
  maxC: number
  maxRiseK: number | null
  source: string
  provenance: Provenance
}

/** IEC 60694 Table 3 limits and related cable limits (reference sheet §1.3). */
export const IEC_TEMPERATURE_LIMITS: readonly TemperatureLimit[] = [
  { id: 'contact-cu-bare', part: 'Contacts, bare copper, in air', maxC: 75, maxRiseK: 35, source: 'IEC 60694 Table 3', provenance: 'published' },
  { id: 'contact-ag-ni', part: 'Contacts, silver or nickel coated, in air', maxC: 105, maxRiseK: 65, source: 'IEC 60694 Table 3', provenance: 'published' },
  { id: 'contact-sn', part: 'Contacts, tin coated, in air', maxC: 90, maxRiseK: 50, source: 'IEC 60694 Table 3', provenance: 'published' },
  { id: 'bolted-bare', part: 'Bolted connection, bare copper or aluminium, in air', maxC: 90, maxRiseK: 50, source: 'IEC 60694 Table 3', provenance: 'published' },
  { id: 'bolted-ag-ni', part: 'Bolted connection, silver or nickel coated, in air', maxC: 115, maxRiseK: 75, source: 'IEC 60694 Table 3', provenance: 'published' },
  { id: 'bolted-sn', part: 'Bolted connection, tin coated, in air', maxC: 105, maxRiseK: 65, source: 'IEC 60694 Table 3', provenance: 'published' },
  { id: 'terminal-bare', part: 'Terminal for external conductors, bare', maxC: 90, maxRiseK: 50, source: 'IEC 60694 Table 3', provenance: 'published' },
  { id: 'terminal-coated', part: 'Terminal for external conductors, coated', maxC: 105, maxRiseK: 65, source: 'IEC 60694 Table 3', provenance: 'published' },
  { id: 'insulation-y', part: 'Insulation class Y', maxC: 90, maxRiseK: null, source: 'IEC 60694 Table 3', provenance: 'published' },
  { id: 'insulation-a', part: 'Insulation class A', maxC: 105, maxRiseK: null, source: 'IEC 60694 Table 3', provenance: 'published' },
  { id: 'insulation-e', part: 'Insulation class E', maxC: 120, maxRiseK: null, source: 'IEC 60694 Table 3', provenance: 'published' },
  { id: 'insulation-b', part: 'Insulation class B', maxC: 130, maxRiseK: null, source: 'IEC 60694 Table 3', provenance: 'published' },
  { id: 'insulation-f', part: 'Insulation class F', maxC: 155, maxRiseK: null, source: 'IEC 60694 Table 3', provenance: 'published' },
  { id: 'insulation-h', part: 'Insulation class H', maxC: 180, maxRiseK: null, source: 'IEC 60694 Table 3', provenance: 'published' },
  { id: 'cable-pvc', part: 'Cable conductor, PVC', maxC: 70, maxRiseK: null, source: 'IEC 60364-5-52', provenance: 'from memory' },
  { id: 'cable-xlpe', part: 'Cable conductor, XLPE or EPR', maxC: 90, maxRiseK: null, source: 'IEC 60502', provenance: 'from memory' },
]

/**
 * Adds an absolute-temperature comparison to a set: above the part's limit ranks as `band`.
 * A tenant chooses the band; nothing in the IEC table says how severe an exceedance is.
 */
export function withAbsoluteLimit(set: CriteriaSet, limit: TemperatureLimit, band: BandNumber = 2): CriteriaSet {
  const action = `Above the ${limit.maxC} °C limit for “${limit.part}” (${limit.source}). ${NETA_ACTION[band]}`
  return {
    ...set,
    id: `${set.id}+${limit.id}`,
    name: `${set.name} with ${limit.part} limit`,
    absoluteLimitsC: {
      // "Above the limit": the first value ranked is just over maxC; the tolerance below keeps maxC itself out.
      minimum: limit.maxC + EDGE_TOLERANCE * 2,
      bands: [{ band, upTo: null, action, repairDeadlineDays: DEADLINE[band] }],
    },
  }
}

/** Band of one value against one comparison, or null when below its minimum. */
export function bandFor(value: number, comparison: CriteriaComparison): CriteriaBand | null {
  if (!Number.isFinite(value) || value < comparison.minimum - EDGE_TOLERANCE) return null
  for (const b of comparison.bands) {
    if (b.upTo === null || value <= b.upTo + EDGE_TOLERANCE) return b
  }
  return null
}

/** Ranks a finding's rises (and optionally its absolute temperature); the more severe band governs. */
export function rankRise(
  rises: { overReferenceK?: number; overAmbientK?: number; absoluteC?: number },
  criteria: CriteriaSet = NETA_100_18,
): RankResult {
  const candidates: Array<[RankBasis, number | undefined, CriteriaComparison | undefined]> = [
    ['overReference', rises.overReferenceK, criteria.overReference],
    ['overAmbient', rises.overAmbientK, criteria.overAmbient],
    ['absolute', rises.absoluteC, criteria.absoluteLimitsC],
  ]
  const byComparison: RankResult['byComparison'] = {}
  let best: { basis: RankBasis; band: CriteriaBand } | null = null
  for (const [basis, value, comparison] of candidates) {
    if (value === undefined || comparison === undefined) continue
    const b = bandFor(value, comparison)
    byComparison[basis] = b ? b.band : null
    // Strictly more severe wins, so on a tie the earlier comparison (over reference first) is the basis.
    if (b && (best === null || b.band < best.band.band)) best = { basis, band: b }
  }
  return {
    band: best ? best.band.band : null,
    basis: best ? best.basis : null,
    action: best
      ? best.band.action
      : 'Below the lowest band of this criteria set: no action from it. Record the check.',
    repairDeadlineDays: best ? best.band.repairDeadlineDays : null,
    byComparison,
    criteriaId: criteria.id,
    criteriaVersion: criteria.version,
  }
}
