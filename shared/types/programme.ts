// Shapes of the JSON the instrument, surface, route and programme routes answer (dates are ISO strings).
import type { CalibrationStatus } from '../instruments'
import type { RouteEstimate } from '../route-plan'
import type { IntervalReason } from '../schedule'
import type { SurfaceMethodId } from '../schemas/surface'

/** One page of a server-paginated list. */
export interface Page<T> {
  items: T[]
  total: number
  page: number
  pageSize: number
  /** Set when the list stopped counting at `total` and there are more (the findings list; see finding-list-sql.ts). */
  totalCapped?: boolean
}

/** GET /api/orgs/:org/instruments, …/instruments/:id */
export interface InstrumentItem {
  id: string
  make: string
  model: string
  serial: string
  bandFromUm: number
  bandToUm: number
  bandLabel: string
  ifovMrad: number | null
  accuracyK: number | null
  accuracyPct: number | null
  calibrationDue: string | null
  calibrationStatus: CalibrationStatus
  notes: string
  archivedAt: string | null
  version: number
}

/** GET /api/orgs/:org/surfaces */
export interface SurfaceItem {
  id: string
  seedKey: string | null
  name: string
  emissivity: number
  range: [number, number] | null
  source: string
  provenance: 'published' | 'from memory' | 'common practice' | 'measured'
  method: SurfaceMethodId | null
  measuredOn: string | null
  notes: string
  createdBy: string | null
  version: number
}

export interface RoutePerson { id: string; name: string; isThermographer: boolean }
export interface RouteInstrument { id: string; label: string; calibrationDue: string | null; calibrationStatus: CalibrationStatus; archived: boolean }

/** GET /api/orgs/:org/routes */
export interface RouteListItem {
  id: string
  name: string
  baseName: string
  recurrenceMonths: number
  stopCount: number
  thermographer: RoutePerson | null
  instrument: RouteInstrument | null
  estimate: RouteEstimate
  archivedAt: string | null
  updatedAt: string
  version: number
}

export interface RouteStopItem {
  siteId: string
  code: string
  name: string
  kind: string
  latitude: number | null
  longitude: number | null
  archived: boolean
}

/** GET /api/orgs/:org/routes/:id */
export interface RouteDetail extends RouteListItem {
  baseLatitude: number
  baseLongitude: number
  notes: string
  stops: RouteStopItem[]
  travel: { roadFactor: number; averageSpeedKmh: number }
}

/** GET /api/orgs/:org/programme/summary */
export interface ProgrammeSummary {
  today: string
  window: number
  assets: number
  overdue: number
  /** Never checked: a baseline survey is due now (counted in every window). */
  baseline: number
  due30: number
  due60: number
  due90: number
}

/** GET /api/orgs/:org/programme/sites and …/programme/routes: one site or route. */
export interface ProgrammeGroupRow {
  id: string
  code: string | null
  name: string
  assets: number
  overdue: number
  baseline: number
  /** Due from today to today + window (baselines included). */
  dueInWindow: number
  nextDue: string | null
  latitude?: number | null
  longitude?: number | null
}

/** GET /api/orgs/:org/programme/assets */
export interface ProgrammeAssetRow {
  id: string
  label: string
  assetClass: string
  siteId: string
  siteCode: string
  siteName: string
  condition: number
  intervalMonths: number
  intervalReason: IntervalReason
  lastCheckedOn: string | null
  dueOn: string
  baseline: boolean
  status: 'overdue' | 'due' | 'later'
}

/** GET /api/orgs/:org/programme/map: every active site for the map. */
export interface MapSite {
  id: string
  code: string
  name: string
  kind: string
  latitude: number | null
  longitude: number | null
  worstBand: 1 | 2 | 3 | 4 | null
  overdue: number
  dueNow: number
}

/** GET /api/orgs/:org/programme/sites/:id */
export interface SiteSummary {
  id: string
  code: string
  name: string
  kind: string
  voltageKv: number | null
  latitude: number | null
  longitude: number | null
  accessNotes: string
  safetyNotes: string
  today: string
  assets: number
  overdue: number
  baseline: number
  due30: number
  due90: number
  nextDue: string | null
  openFindings: number
  worstBand: 1 | 2 | 3 | 4 | null
  routes: Array<{ id: string; name: string }>
  upcoming: Array<{ id: string; label: string; dueOn: string; baseline: boolean; intervalMonths: number }>
}

/** A stop in the route editor before it is saved. */
export interface DraftStop {
  siteId: string
  code: string
  name: string
  latitude: number | null
  longitude: number | null
  archived?: boolean
}

/** A route to draw on the map: the base, then the stops in visiting order (numbered from 1), back to the base. */
export interface MapRoute {
  base: { lat: number; lon: number; name: string }
  stops: Array<{ id: string; lat: number | null; lon: number | null }>
}

/** The route form's typed values (numbers as text until submit). */
export interface RouteDraftFields {
  name: string
  baseName: string
  baseLatitude: string
  baseLongitude: string
  recurrenceMonths: string
  thermographerId: string | null
  instrumentId: string | null
  notes: string
}
