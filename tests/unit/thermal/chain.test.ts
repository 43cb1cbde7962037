import { describe, expect, it } from 'vitest'
import {
  correctionChain,
  MIL_STD_2194,
  objectTemperature,
  objectTemperatureSigma,
  ThermalInputError,
  type Reading,
} from '#shared/thermal'

const LWIR = { fromUm: 8, toUm: 14 }
const K = (c: number): number => c + 273.15

const reading: Reading = {
  hotApparentK: K(50),
  referenceApparentK: K(35),
  ambientK: K(25),
  emissivity: 0.95,
  reflectedK: K(20),
  band: LWIR,
}

describe('correctionChain', () => {
  it('runs the steps in order: apparent → corrected → rises → load → wind → band', () => {
    const r = correctionChain(reading)
    expect(r.steps.map((s) => s.id)).toEqual(['apparent', 'corrected', 'rise', 'load', 'wind', 'band'])
  })

  it('corrects with band radiometry and keeps σT⁴ only as a comparison ([C] SciPy, reference sheet §5)', () => {
    const r = correctionChain(reading)
    expect(r.hotObjectK - 273.15).toBeCloseTo(51.392, 3)
    expect(r.sigmaShortcutK! - 273.15).toBeCloseTo(51.364, 3)
    const corrected = r.steps[1]!.values.find((v) => v.key === 'hotObject')!
    expect(corrected.value).toBe(r.hotObjectK)
  })

  it('computes rises from corrected temperatures and ranks them (ANSI/NETA Table 100.18)', () => {
    const r = correctionChain(reading)
    const hot = objectTemperature({ apparentK: K(50), emissivity: 0.95, reflectedK: K(20), band: LWIR })
    const ref = objectTemperature({ apparentK: K(35), emissivity: 0.95, reflectedK: K(20), band: LWIR })
    expect(r.measured.overReferenceK).toBeCloseTo(hot - ref, 10)
    expect(r.measured.overAmbientK).toBeCloseTo(hot - K(25), 10)
    // ≈ 15.7 K over reference → band 1; ≈ 26.4 K over ambient → band 2; the more severe governs
    expect(r.rank.band).toBe(1)
    expect(r.rank.basis).toBe('overReference')
  })

  it('scales the rises to full load by (I_rated/I_measured)^n before ranking (reference sheet §2)', () => {
    const r = correctionChain({ ...reading, referenceApparentK: undefined, loadA: 40, ratedA: 100, hotApparentK: K(35) }, { loadExponent: 1.6 })
    expect(r.loadFactor).toBeCloseTo(2.5 ** 1.6, 10)
    expect(r.ranked.overAmbientK).toBeCloseTo(r.measured.overAmbientK! * 2.5 ** 1.6, 10)
    expect(r.steps[3]!.note).toMatch(/40 %/)
    expect(r.warnings.map((w) => w.code)).not.toContain('load-low')
  })

  it('shows the wind estimate but applies it only when asked', () => {
    const off = correctionChain({ ...reading, windMs: 3 })
    expect(off.windApplied).toBe(false)
    expect(off.ranked.overAmbientK).toBeCloseTo(off.measured.overAmbientK!, 10)
    const on = correctionChain({ ...reading, windMs: 3 }, { applyWindFactor: true })
    expect(on.windApplied).toBe(true)
    expect(on.ranked.overAmbientK).toBeCloseTo(on.measured.overAmbientK! * 1.64, 10) // reference sheet §2 (from memory): 3 m/s → 1.64
  })

  it('carries uncertainty through and warns when the interval crosses a band edge', () => {
    const r = correctionChain(
      { ...reading, referenceApparentK: undefined, hotApparentK: K(45), loadA: 100, ratedA: 100 },
      { tolerances: { emissivity: 0.05, reflectedK: 5, instrument: { absoluteK: 2, relativePct: 2 } } },
    )
    const i = r.rankedIntervals.overAmbientK!
    expect(i.low).toBeLessThan(r.ranked.overAmbientK!)
    expect(i.high).toBeGreaterThan(r.ranked.overAmbientK!)
    // ≈ 20.3 K over ambient, ±2 K instrument: straddles the 20 K edge of ANSI/NETA Table 100.18
    expect(i.low).toBeLessThan(20)
    expect(i.high).toBeGreaterThan(20)
    expect(r.warnings.map((w) => w.code)).toContain('interval-crosses-band')
  })

  it('keeps the result but drops the interval, with a critical warning, when the tolerances leave it unbounded', () => {
    const r = correctionChain(
      { ...reading, referenceApparentK: undefined, hotApparentK: 300, emissivity: 0.15, reflectedK: 310 },
      { tolerances: { emissivity: 0.1, reflectedK: 10 } },
    )
    expect(r.hotObjectK).toBeGreaterThan(0)
    expect(r.hotInterval).toBeUndefined()
    expect(r.warnings[0]).toMatchObject({ code: 'uncertainty-unbounded', severity: 'critical' })
  })

  it('uses the criteria set it is given and reports it', () => {
    const r = correctionChain(reading, { criteria: MIL_STD_2194 })
    expect(r.rank.criteriaId).toBe('mil-std-2194')
    expect(r.rank.band).toBe(3) // ≈ 26.4 K over ambient: 25–39 (MIL-STD-2194, from memory)
  })

  it('passes warnings through (low ε, overdue calibration)', () => {
    const r = correctionChain({ ...reading, emissivity: 0.4 }, { calibrationDue: '2024-01-01', today: '2024-06-01' })
    expect(r.warnings.map((w) => w.code)).toEqual(expect.arrayContaining(['emissivity-low', 'calibration-overdue', 'load-not-recorded']))
  })

  it('throws the typed error when the reading cannot be explained', () => {
    expect(() => correctionChain({ ...reading, emissivity: 0.1, reflectedK: K(120) })).toThrow(ThermalInputError)
  })

  it('σ shortcut stays null-safe when only it fails', () => {
    const r = correctionChain({ ...reading, emissivity: 1 })
    expect(r.sigmaShortcutK).toBeCloseTo(objectTemperatureSigma({ apparentK: K(50), emissivity: 1, reflectedK: K(20), band: LWIR }), 10)
  })
})
