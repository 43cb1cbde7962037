import { describe, expect, it } from 'vitest'
import { formatDuration, routeEstimate, shortestOrder } from '#shared/route-plan'
import { calibrationStatus, bandLabel, bandPresetOf } from '#shared/instruments'
import { BAND_COLOURS, CLEAR_COLOUR, siteMarkerStyle } from '#shared/site-status'

// One degree of a great circle: R·π/180 with the IUGG mean radius R = 6371.0088 km (analytic, Python 3).
const DEGREE_KM = 111.1950802335329

describe('shortestOrder', () => {
  it('visits stops along a line in order, out and back from the base', () => {
    const base = { lat: 0, lon: 0 }
    const stops = [{ lat: 0, lon: 3 }, { lat: 0, lon: 1 }, { lat: 0, lon: 2 }]
    const order = shortestOrder(base, stops)
    // Either direction of the loop is equally short.
    expect([[1, 2, 0], [0, 2, 1]]).toContainEqual(order)
    const ordered = order.map((i) => stops[i]!)
    // Out 3° and back 3° along the equator (analytic arc length).
    expect(routeEstimate(base, ordered, { roadFactor: 1, averageSpeedKmh: 60 }).straightKm).toBeCloseTo(6 * DEGREE_KM, 6)
    // The order given (3, 1, 2) zig-zags: 3 + 2 + 1 + 2 degrees.
    expect(routeEstimate(base, stops, { roadFactor: 1, averageSpeedKmh: 60 }).straightKm).toBeCloseTo(8 * DEGREE_KM, 6)
  })

  it('finds the shortest loop round the corners of a square, whatever order they come in', () => {
    const base = { lat: 0, lon: 0 }
    const stops = [{ lat: 1, lon: 1 }, { lat: 0, lon: 1 }, { lat: 1, lon: 0 }]
    const order = shortestOrder(base, stops)
    // The diagonal (0,0)→(1,1) is never an edge of the shortest loop.
    expect(order[0]).not.toBe(0)
    expect(order[2]).not.toBe(0)
    expect(order[1]).toBe(0)
  })

  it('keeps stops without coordinates at the end, in their order', () => {
    const base = { lat: 52.4, lon: -1.9 }
    const stops = [{ lat: null, lon: null }, { lat: 52.5, lon: -1.8 }, { lat: null, lon: null }, { lat: 52.3, lon: -2.0 }]
    const order = shortestOrder(base, stops)
    expect(order.slice(2)).toEqual([0, 2])
    expect(order.slice(0, 2).sort()).toEqual([1, 3])
    expect(routeEstimate(base, stops, { roadFactor: 1.3, averageSpeedKmh: 60 }).missing).toBe(2)
  })
})

describe('routeEstimate', () => {
  it('multiplies by the road factor and divides by the average speed', () => {
    const e = routeEstimate({ lat: 0, lon: 0 }, [{ lat: 0, lon: 1 }], { roadFactor: 1.5, averageSpeedKmh: 50 })
    expect(e.straightKm).toBeCloseTo(2 * DEGREE_KM, 6)
    expect(e.roadKm).toBeCloseTo(2 * DEGREE_KM * 1.5, 6)
    expect(e.hours).toBeCloseTo((2 * DEGREE_KM * 1.5) / 50, 9)
    expect(e.missing).toBe(0)
  })

  it('is zero for a route without stops', () => {
    expect(routeEstimate({ lat: 10, lon: 10 }, [], { roadFactor: 1.3, averageSpeedKmh: 60 })).toEqual({ straightKm: 0, roadKm: 0, hours: 0, missing: 0 })
  })

  it('formats hours as hours and minutes', () => {
    expect(formatDuration(2.5)).toBe('2 h 30 min')
    expect(formatDuration(0.25)).toBe('15 min')
    expect(formatDuration(1.999)).toBe('2 h 00 min')
  })
})

describe('instrument helpers', () => {
  it('flags a calibration date in the past, and one coming within 30 days', () => {
    expect(calibrationStatus('2026-12-01', '2026-12-02')).toBe('overdue')
    expect(calibrationStatus('2026-12-02', '2026-12-02')).toBe('due soon')
    expect(calibrationStatus('2027-01-01', '2026-12-02')).toBe('due soon')
    expect(calibrationStatus('2027-01-02', '2026-12-02')).toBe('in date')
    expect(calibrationStatus(null, '2026-12-02')).toBe('unknown')
  })

  it('names the common bands and shows custom ones as numbers', () => {
    expect(bandPresetOf(7.5, 14)).toBe('lwir')
    expect(bandPresetOf(3, 5)).toBe('mwir')
    expect(bandPresetOf(8, 12)).toBe('custom')
    expect(bandLabel(8, 14)).toBe('LWIR 8–14 µm')
    expect(bandLabel(8, 12)).toBe('8–12 µm')
  })
})

describe('siteMarkerStyle', () => {
  it('colours a site by its worst open band with the inferno stops, slate when there is none', () => {
    expect(siteMarkerStyle({ worstBand: null, overdue: 0 }).fill).toBe(CLEAR_COLOUR)
    expect(siteMarkerStyle({ worstBand: 1, overdue: 0 }).fill).toBe('#A52C60') // product.md: band 1 inferno stop
    expect(siteMarkerStyle({ worstBand: 4, overdue: 0 }).fill).toBe(BAND_COLOURS[4])
  })

  it('marks an overdue site with a dark dashed ring and says so in words', () => {
    const s = siteMarkerStyle({ worstBand: null, overdue: 3 })
    expect(s.dashArray).toBeDefined()
    expect(s.weight).toBeGreaterThan(siteMarkerStyle({ worstBand: null, overdue: 0 }).weight)
    expect(s.label).toMatch(/3 overdue/)
    expect(s.label).toMatch(/no open findings/)
  })
})
