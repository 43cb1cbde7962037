/** Mean Earth radius R₁ = (2a + b)/3 of the IUGG, in km (Moritz, Geodetic Reference System 1980). */
export const EARTH_MEAN_RADIUS_KM = 6371.0088

/** A point on the Earth in decimal degrees (WGS 84 latitude and longitude). */
export interface LatLon {
  lat: number
  lon: number
}

export interface TripEstimateOptions {
  /** Road distance over great-circle distance (an organisation setting; must be ≥ 1). */
  roadFactor?: number
  /** Average driving speed over the whole loop, in km/h. */
  averageKmh?: number
}

export interface TripEstimate {
  /** Great-circle length of the closed loop, in km. */
  straightKm: number
  /** straightKm × road factor, in km. */
  roadKm: number
  /** roadKm ÷ average speed, in hours. */
  hours: number
}

const DEG = Math.PI / 180

function checkPoint(p: LatLon, label: string): void {
  if (!(Number.isFinite(p.lat) && p.lat >= -90 && p.lat <= 90)) {
    throw new RangeError(`${label}: latitude must be between -90° and 90°, got ${p.lat}`)
  }
  if (!Number.isFinite(p.lon)) throw new RangeError(`${label}: longitude must be a finite number, got ${p.lon}`)
}

/**
 * Great-circle distance in km between two points on a sphere of the IUGG mean radius (haversine formula;
 * well conditioned for nearby points, within a metre for nearly antipodal ones).
 */
export function greatCircleKm(a: LatLon, b: LatLon): number {
  checkPoint(a, 'first point')
  checkPoint(b, 'second point')
  const sinHalfLat = Math.sin(((b.lat - a.lat) * DEG) / 2)
  const sinHalfLon = Math.sin(((b.lon - a.lon) * DEG) / 2)
  const h = sinHalfLat * sinHalfLat + Math.cos(a.lat * DEG) * Math.cos(b.lat * DEG) * sinHalfLon * sinHalfLon
  // Rounding can push h a hair above 1 for antipodal points, where asin would return NaN.
  return 2 * EARTH_MEAN_RADIUS_KM * Math.asin(Math.min(1, Math.sqrt(h)))
}

/**
 * Length and driving time of the closed loop that visits `stops` in `order` and returns to order[0]:
 * great-circle km, × road factor, ÷ average speed.
 */
export function tripEstimate(stops: readonly LatLon[], order: readonly number[], options: TripEstimateOptions = {}): TripEstimate {
  const roadFactor = options.roadFactor ?? 1.3
  const averageKmh = options.averageKmh ?? 60
  // A road is never shorter than the straight line between its ends.
  if (!(Number.isFinite(roadFactor) && roadFactor >= 1)) throw new RangeError(`roadFactor must be a number ≥ 1, got ${roadFactor}`)
  if (!(Number.isFinite(averageKmh) && averageKmh > 0)) throw new RangeError(`averageKmh must be above 0, got ${averageKmh}`)
  for (const i of order) {
    if (!(Number.isInteger(i) && i >= 0 && i < stops.length)) throw new RangeError(`order holds ${i}, which is not a stop index`)
  }
  let straightKm = 0
  if (order.length > 1) {
    for (let k = 0; k < order.length; k++) {
      const from = stops[order[k]!]!
      const to = stops[order[k + 1 === order.length ? 0 : k + 1]!]!
      straightKm += greatCircleKm(from, to)
    }
  }
  const roadKm = straightKm * roadFactor
  return { straightKm, roadKm, hours: roadKm / averageKmh }
}
