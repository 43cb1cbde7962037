// Database rows of the asset register turned into API objects (camelCase) at the service boundary.
import type { AssetClass, SiteKind, SiteSafetyFlag } from '#shared/register'
import type { AssetItem, SiteItem } from '#shared/types/register'

const num = (v: string | number | null | undefined): number | null => (v === null || v === undefined ? null : Number(v))
const iso = (d: Date | string | null) => (d === null ? null : new Date(d).toISOString())

export interface SiteRowLike {
  id: string
  code: string
  name: string
  kind: string
  latitude: number | null
  longitude: number | null
  voltage_kv: string | null
  access_notes: string
  safety_notes: string
  safety_flags: string[]
  archived_at: Date | null
  version: number
  created_at: Date
  updated_at: Date
  asset_count?: number | string | null
}

/** A sites row (with its active asset count) as the API answers it. */
export function siteView(r: SiteRowLike): SiteItem {
  return {
    id: r.id,
    code: r.code,
    name: r.name,
    kind: r.kind as SiteKind,
    latitude: r.latitude,
    longitude: r.longitude,
    voltageKv: num(r.voltage_kv),
    accessNotes: r.access_notes,
    safetyNotes: r.safety_notes,
    safetyFlags: r.safety_flags as SiteSafetyFlag[],
    assetCount: Number(r.asset_count ?? 0),
    archivedAt: iso(r.archived_at),
    version: r.version,
    createdAt: iso(r.created_at)!,
    updatedAt: iso(r.updated_at)!,
  }
}

export interface AssetRowLike {
  id: string
  site_id: string
  site_code: string
  site_name: string
  site_archived_at: Date | null
  label: string
  asset_class: string
  manufacturer: string
  model: string
  voltage_kv: string | null
  rated_current_a: string | null
  criticality: number
  condition: number
  components: string[]
  interval_months: number | null
  due_on?: string | Date | null
  archived_at: Date | null
  version: number
  created_at: Date
  updated_at: Date
}

// A date column arrives as a Date at local midnight of the server; the calendar day is what matters.
function dateOnly(v: string | Date | null | undefined): string | null {
  if (v === null || v === undefined) return null
  if (typeof v === 'string') return v.slice(0, 10)
  return `${v.getFullYear()}-${String(v.getMonth() + 1).padStart(2, '0')}-${String(v.getDate()).padStart(2, '0')}`
}

/** An assets row joined with its site as the API answers it. */
export function assetView(r: AssetRowLike): AssetItem {
  return {
    id: r.id,
    site: { id: r.site_id, code: r.site_code, name: r.site_name, archived: r.site_archived_at !== null },
    label: r.label,
    assetClass: r.asset_class as AssetClass,
    manufacturer: r.manufacturer,
    model: r.model,
    voltageKv: num(r.voltage_kv),
    ratedCurrentA: num(r.rated_current_a),
    criticality: r.criticality,
    condition: r.condition,
    components: r.components,
    intervalMonths: r.interval_months,
    dueOn: dateOnly(r.due_on),
    archivedAt: iso(r.archived_at),
    version: r.version,
    createdAt: iso(r.created_at)!,
    updatedAt: iso(r.updated_at)!,
  }
}
