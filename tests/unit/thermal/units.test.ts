import { describe, expect, it } from 'vitest'
import { cToF, cToK, deltaFromKelvin, deltaToKelvin, fToC, fromKelvin, fromMetres, ftToM, kToC, mToFt, toKelvin, toMetres } from '#shared/units'

describe('unit conversions', () => {
  it('fixed points of the temperature scales (SI definition of the kelvin and Celsius)', () => {
    expect(cToK(0)).toBe(273.15)
    expect(kToC(373.15)).toBeCloseTo(100, 12)
    expect(cToF(100)).toBeCloseTo(212, 12)
    expect(fToC(32)).toBeCloseTo(0, 12)
    expect(cToF(-40)).toBeCloseTo(-40, 12)
  })

  it('round-trips through the person’s units', () => {
    for (const v of [-40, 0, 21.5, 850]) {
      expect(fromKelvin(toKelvin(v, 'F'), 'F')).toBeCloseTo(v, 10)
      expect(fromKelvin(toKelvin(v, 'C'), 'C')).toBeCloseTo(v, 10)
    }
    expect(fromMetres(toMetres(12, 'ft'), 'ft')).toBeCloseTo(12, 12)
  })

  it('a rise of 10 K is 18 °F, not a temperature conversion', () => {
    expect(deltaFromKelvin(10, 'F')).toBeCloseTo(18, 12)
    expect(deltaToKelvin(18, 'F')).toBeCloseTo(10, 12)
    expect(deltaFromKelvin(10, 'C')).toBe(10)
  })

  it('the international foot is exactly 0.3048 m', () => {
    expect(ftToM(1)).toBe(0.3048)
    expect(mToFt(0.3048)).toBeCloseTo(1, 15)
  })
})

describe('display formatting', async () => {
  const { formatDelta, formatLength, formatNumber, formatTemperature } = await import('#shared/units')
  it('shows units, a true minus sign and no negative zero', () => {
    expect(formatTemperature(341.55, 'C')).toBe('68.4 °C')
    expect(formatTemperature(341.55, 'F')).toBe('155.1 °F')
    expect(formatTemperature(233.15, 'C')).toBe('−40.0 °C')
    expect(formatDelta(10, 'F')).toBe('18.0 °F')
    expect(formatDelta(10, 'C')).toBe('10.0 K')
    expect(formatLength(4, 'ft')).toBe('13.1 ft')
    expect(formatNumber(-0.04)).toBe('0.0')
    expect(formatNumber(Number.NaN)).toBe('—')
  })
})
