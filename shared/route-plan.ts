// Route maths shared by the route editor (instant feedback) and the server (what is saved and reported):
// the visiting order for the shortest trip and the travel estimate of a route's loop from its base.
import { greatCircleKm, planTour, tripEstimate, type LatLon } from './routing/index'

/** A stop as the planner sees it: coordinates may be missing on a site that has none recorded yet. */
export interface PlanStop {
  lat: number | null
  lon: number | null
}

export interface RouteEstimate {
  /** Great-circle length of the loop base → stops → base, in km. */
  straightKm: number
  /** straightKm × the organisation's road factor, in km. */
  roadKm: number
  /** roadKm ÷ the organisation's average speed, in hours. */
  hours: number
  /** Stops left out because their site has no coordinates. */
  missing: number
}

const located = (s: PlanStop): s is { lat: number; lon: number } =>
  s.lat !== null && s.lon !== null && Number.isFinite(s.lat) && Number.isFinite(s.lon)

/**
 * The stop order (indices into `stops`) for the shortest closed trip from `base`, by the tour planner.
 * Stops without coordinates cannot be placed: they keep their relative order at the end.
 */
export function shortestOrder(base: LatLon, stops: readonly PlanStop[]): number[] {
  const placed = stops.map((s, i) => ({ s, i })).filter((x) => located(x.s))
  const unplaced = stops.map((_, i) => i).filter((i) => !located(stops[i]!))
  const points: LatLon[] = [base, ...placed.map((x) => ({ lat: x.s.lat!, lon: x.s.lon! }))]
  const tour = planTour(points.length, (i, j) => greatCircleKm(points[i]!, points[j]!), { start: 0 })
  // The planner's loop may run either way round; both are the same length, so keep the one it gives.
  return [...tour.slice(1).map((k) => placed[k - 1]!.i), ...unplaced]
}

/** Distance and driving time of the loop base → stops in the given order → base. */
export function routeEstimate(
  base: LatLon,
  stops: readonly PlanStop[],
  settings: { roadFactor: number; averageSpeedKmh: number },
): RouteEstimate {
  const points: LatLon[] = [base, ...stops.filter(located).map((s) => ({ lat: s.lat, lon: s.lon }))]
  const trip = tripEstimate(points, points.map((_, i) => i), { roadFactor: settings.roadFactor, averageKmh: settings.averageSpeedKmh })
  return { ...trip, missing: stops.length - (points.length - 1) }
}

/** "2 h 35 min" for a number of hours. */
export function formatDuration(hours: number): string {
  const minutes = Math.round(hours * 60)
  const h = Math.floor(minutes / 60)
  const m = minutes % 60
  return h ? `${h} h ${String(m).padStart(2, '0')} min` : `${m} min`
}
