import type { Insertable, Selectable } from 'kysely'

/** One site of a route, at its place in the visiting order (0 = first after the base). */
export interface RouteStopsTable {
  organisation_id: string
  route_id: string
  site_id: string
  position: number
}
export type RouteStop = Selectable<RouteStopsTable>
export type NewRouteStop = Insertable<RouteStopsTable>
