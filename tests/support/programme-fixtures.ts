import type { Kysely } from 'kysely'
import type { Database } from '../../db/database'
import { testDb } from './db'

// Register rows written straight into the test database, so the programme tests do not depend on the register's forms.

/** The id of an organisation by its slug. */
export async function orgIdOf(slug: string): Promise<string> {
  const row = await testDb().selectFrom('organisations').select('id').where('slug', '=', slug).executeTakeFirstOrThrow()
  return row.id
}

export interface SiteSeed { code: string; name: string; lat: number | null; lon: number | null; kind?: 'substation' | 'switchyard' | 'plant_room' | 'line_section' }

/** Inserts sites and returns their ids by code. */
export async function insertSites(orgId: string, sites: SiteSeed[], db: Kysely<Database> = testDb()): Promise<Record<string, string>> {
  const rows = await db.insertInto('sites')
    .values(sites.map((s) => ({ organisation_id: orgId, code: s.code, name: s.name, kind: s.kind ?? 'substation', latitude: s.lat, longitude: s.lon, archived_at: null })))
    .returning(['id', 'code'])
    .execute()
  return Object.fromEntries(rows.map((r) => [r.code, r.id]))
}

export interface AssetSeed { siteId: string; label: string; condition?: 1 | 2 | 3; intervalMonths?: number | null; assetClass?: string }

/** Inserts assets and returns their ids by label. */
export async function insertAssets(orgId: string, assets: AssetSeed[], db: Kysely<Database> = testDb()): Promise<Record<string, string>> {
  const rows = await db.insertInto('assets')
    .values(assets.map((a) => ({
      organisation_id: orgId, site_id: a.siteId, label: a.label, asset_class: a.assetClass ?? 'breaker', condition: a.condition ?? 1,
      interval_months: a.intervalMonths ?? null, archived_at: null,
    })))
    .returning(['id', 'label'])
    .execute()
  return Object.fromEntries(rows.map((r) => [r.label, r.id]))
}
