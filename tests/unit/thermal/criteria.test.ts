import { describe, expect, it } from 'vitest'
import {
  CRITERIA_SETS,
  DISTRIBUTION_OVERHEAD,
  DISTRIBUTION_UNDERGROUND,
  GENERIC_THREE_LEVEL,
  IEC_TEMPERATURE_LIMITS,
  MIL_STD_2194,
  NETA_100_18,
  criteriaSetById,
  rankRise,
  withAbsoluteLimit,
} from '#shared/thermal'

describe('rankRise with ANSI/NETA Table 100.18', () => {
  // ANSI/NETA ATS/MTS Table 100.18 (reference sheet §1.1); fractional values: a band starts just above the
  // previous band's upper edge (documented choice, issue 3).
  it.each([
    [0.99, null],
    [1, 4],
    [3.0, 4],
    [3.01, 3],
    [15, 3],
    [15.01, 1],
    [80, 1],
  ])('over reference %f K → band %s (ANSI/NETA Table 100.18)', (rise, band) => {
    expect(rankRise({ overReferenceK: rise }).band).toBe(band)
  })

  it.each([
    [0.5, null],
    [1, 4],
    [10, 4],
    [10.5, 3],
    [20, 3],
    [20.5, 2],
    [40, 2],
    [40.5, 1],
  ])('over ambient %f K → band %s (ANSI/NETA Table 100.18)', (rise, band) => {
    expect(rankRise({ overAmbientK: rise }).band).toBe(band)
  })

  it('the more severe comparison governs, and says which one it was (common practice)', () => {
    const a = rankRise({ overReferenceK: 2, overAmbientK: 25 })
    expect(a.band).toBe(2)
    expect(a.basis).toBe('overAmbient')
    expect(a.byComparison).toEqual({ overReference: 4, overAmbient: 2 })
    const b = rankRise({ overReferenceK: 16, overAmbientK: 12 })
    expect(b.band).toBe(1)
    expect(b.basis).toBe('overReference')
    const c = rankRise({ overReferenceK: 0.4, overAmbientK: 5 })
    expect(c.band).toBe(4)
    expect(c.byComparison.overReference).toBeNull()
  })

  it('a rise that lands on an edge by subtraction still counts as on the edge', () => {
    // 313.15 − 310.15 is not exactly 3 in binary floating point.
    expect(rankRise({ overReferenceK: 313.15 - 310.15 }).band).toBe(4)
    expect(rankRise({ overAmbientK: 333.15 - 293.15 }).band).toBe(2)
  })

  it('returns an action, a repair deadline and the set it was ranked with', () => {
    const r = rankRise({ overAmbientK: 50 }, NETA_100_18)
    expect(r.action.length).toBeGreaterThan(10)
    expect(r.repairDeadlineDays).toBe(1) // reference sheet §6 (common practice): band 1 within a day
    expect(rankRise({ overAmbientK: 30 }).repairDeadlineDays).toBe(30) // reference sheet §6: band 2 ≈ 30 days
    expect(rankRise({ overAmbientK: 5 }).repairDeadlineDays).toBeNull() // reference sheet §6: band 4 record and trend
    expect(r.criteriaId).toBe('neta-100-18')
    const none = rankRise({})
    expect(none.band).toBeNull()
    expect(none.basis).toBeNull()
  })

  it('has no band 2 over reference (ANSI/NETA Table 100.18)', () => {
    const bands = NETA_100_18.overReference!.bands.map((b) => b.band)
    expect(bands).toEqual([4, 3, 1])
  })
})

describe('other published sets', () => {
  it('MIL-STD-2194 edges (from memory): 10–24, 25–39, 40–69, ≥ 70', () => {
    const rank = (v: number) => rankRise({ overAmbientK: v }, MIL_STD_2194).band
    expect(MIL_STD_2194.provenance).toBe('from memory')
    expect(rank(9.9)).toBeNull()
    expect(rank(10)).toBe(4)
    expect(rank(24)).toBe(4)
    expect(rank(25)).toBe(3)
    expect(rank(39)).toBe(3)
    expect(rank(40)).toBe(2)
    expect(rank(69)).toBe(2)
    expect(rank(70)).toBe(1)
  })

  it('distribution-utility overhead grades: 14–20 → 3, 21–60 → 2, ≥ 61 → 1 (training-manual reproduction)', () => {
    const rank = (v: number) => rankRise({ overReferenceK: v }, DISTRIBUTION_OVERHEAD).band
    expect([rank(13), rank(14), rank(20), rank(21), rank(60), rank(61)]).toEqual([null, 3, 3, 2, 2, 1])
  })

  it('distribution-utility underground grades: 2–4 → 3, 5–10 → 2, ≥ 11 → 1 (training-manual reproduction)', () => {
    const rank = (v: number) => rankRise({ overReferenceK: v }, DISTRIBUTION_UNDERGROUND).band
    expect([rank(1.9), rank(2), rank(4), rank(5), rank(10), rank(11)]).toEqual([null, 3, 3, 2, 2, 1])
  })

  it('generic chart: 10–20 minor, 21–49 serious, ≥ 50 critical (training-manual reproduction)', () => {
    const rank = (v: number) => rankRise({ overReferenceK: v }, GENERIC_THREE_LEVEL).band
    expect([rank(9), rank(10), rank(20), rank(21), rank(49), rank(50)]).toEqual([null, 3, 3, 2, 2, 1])
  })

  it('every set lists bands least severe first with increasing edges', () => {
    for (const set of CRITERIA_SETS) {
      for (const comp of [set.overReference, set.overAmbient, set.absoluteLimitsC]) {
        if (!comp) continue
        const edges = comp.bands.map((b) => b.upTo ?? Number.POSITIVE_INFINITY)
        expect([...edges].sort((a, b) => a - b)).toEqual(edges)
        const bands = comp.bands.map((b) => b.band)
        expect([...bands].sort((a, b) => b - a)).toEqual(bands)
        expect(comp.bands.at(-1)!.upTo).toBeNull()
      }
    }
    expect(criteriaSetById('nope')).toBe(NETA_100_18)
    expect(criteriaSetById('mil-std-2194')).toBe(MIL_STD_2194)
  })

  it('an absolute limit from the IEC table ranks temperatures above it (IEC 60694 Table 3)', () => {
    const limit = IEC_TEMPERATURE_LIMITS.find((l) => l.id === 'bolted-bare')!
    expect(limit.maxC).toBe(90) // IEC 60694 Table 3: bolted bare Cu/Al in air 90 °C
    expect(limit.maxRiseK).toBe(50)
    const set = withAbsoluteLimit(NETA_100_18, limit, 2)
    expect(rankRise({ absoluteC: 90 }, set).band).toBeNull()
    const r = rankRise({ absoluteC: 91, overAmbientK: 5 }, set)
    expect(r.band).toBe(2)
    expect(r.basis).toBe('absolute')
  })
})
