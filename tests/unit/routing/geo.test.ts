import { describe, expect, it } from 'vitest'
import { EARTH_MEAN_RADIUS_KM, greatCircleKm, tripEstimate } from '#shared/routing'

describe('greatCircleKm', () => {
  it('uses the IUGG mean Earth radius', () => {
    expect(EARTH_MEAN_RADIUS_KM).toBe(6371.0088) // IUGG mean radius R₁ (GRS 80)
  })

  it('matches an independent value for Nashville (BNA) to Los Angeles (LAX)', () => {
    const bna = { lat: 36.12, lon: -86.67 }
    const lax = { lat: 33.94, lon: -118.4 }
    // Independent computation: Python 3 math, angle = atan2(|a×b|, a·b) of the unit vectors, × 6371.0088 km.
    // Cross-check: the Rosetta Code "Haversine formula" task gives 2886.44444283798 km for R = 6371.0 km,
    // which scales to 2886.44843 km for R = 6371.0088 km.
    expect(greatCircleKm(bna, lax)).toBeCloseTo(2886.4484297648555, 6)
    expect(greatCircleKm(lax, bna)).toBeCloseTo(2886.4484297648555, 6)
  })

  it('gives the analytic arcs: a degree of the equator, a quarter meridian, antipodes', () => {
    // Arc length s = R·θ on a sphere (analytic): R·π/180, R·π/2 and R·π, evaluated in Python 3.
    expect(greatCircleKm({ lat: 0, lon: 10 }, { lat: 0, lon: 11 })).toBeCloseTo(111.1950802335329, 6)
    expect(greatCircleKm({ lat: 0, lon: 0 }, { lat: 90, lon: 0 })).toBeCloseTo(10007.557221017962, 6)
    expect(greatCircleKm({ lat: 0, lon: 0 }, { lat: 0, lon: 180 })).toBeCloseTo(20015.114442035923, 6)
    // Haversine loses precision for nearly antipodal points (asin near 1): a metre is the fair bound there.
    expect(Math.abs(greatCircleKm({ lat: 10, lon: 20 }, { lat: -10, lon: -160 }) - 20015.114442035923)).toBeLessThan(0.001)
    expect(greatCircleKm({ lat: 59.91, lon: 10.75 }, { lat: 59.91, lon: 10.75 })).toBe(0)
  })

  it('refuses coordinates that are not on the Earth', () => {
    expect(() => greatCircleKm({ lat: 91, lon: 0 }, { lat: 0, lon: 0 })).toThrow(RangeError)
    expect(() => greatCircleKm({ lat: 0, lon: 0 }, { lat: 0, lon: Number.NaN })).toThrow(RangeError)
  })
})

describe('tripEstimate', () => {
  // Three stops on the equator at 0°, 1° and 3° E: the closed loop is 1° + 2° + 3° = 6° of arc.
  const stops = [
    { lat: 0, lon: 0 },
    { lat: 0, lon: 1 },
    { lat: 0, lon: 3 },
  ]
  const sixDegreesKm = 667.1704814011975 // 6 × 111.1950802335329 km (R·θ, analytic)

  it('multiplies the loop by the road factor and divides by the speed', () => {
    const trip = tripEstimate(stops, [0, 1, 2])
    expect(trip.straightKm).toBeCloseTo(sixDegreesKm, 6)
    expect(trip.roadKm).toBeCloseTo(867.3216258215568, 6) // × 1.3 by default
    expect(trip.hours).toBeCloseTo(14.45536043035928, 8) // ÷ 60 km/h by default
    const custom = tripEstimate(stops, [0, 1, 2], { roadFactor: 1.25, averageKmh: 50 })
    expect(custom.roadKm).toBeCloseTo(833.9631017514969, 6)
    expect(custom.hours).toBeCloseTo(16.679262035029938, 8)
  })

  it('closes the loop back to the first stop of the order', () => {
    expect(tripEstimate(stops, [2, 0, 1]).straightKm).toBeCloseTo(sixDegreesKm, 6)
    // Out and back between two stops.
    expect(tripEstimate(stops, [0, 2]).straightKm).toBeCloseTo(sixDegreesKm, 6)
    expect(tripEstimate(stops, [1])).toEqual({ straightKm: 0, roadKm: 0, hours: 0 })
    expect(tripEstimate([], [])).toEqual({ straightKm: 0, roadKm: 0, hours: 0 })
  })

  it('refuses settings and orders that make no sense', () => {
    expect(() => tripEstimate(stops, [0, 1, 2], { roadFactor: 0.9 })).toThrow(RangeError)
    expect(() => tripEstimate(stops, [0, 1, 2], { averageKmh: 0 })).toThrow(RangeError)
    expect(() => tripEstimate(stops, [0, 1, 3])).toThrow(RangeError)
  })
})
