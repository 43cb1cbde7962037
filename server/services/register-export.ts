// CSV export of the register in the import's own columns, streamed a batch at a time so that 100 000 assets
// never sit in memory at once (and a file exported here imports unchanged).
import { Readable } from 'node:stream'
import { csvLine, guardCell } from '#shared/csv'
import { ASSET_CSV_COLUMNS, SITE_CSV_COLUMNS } from '#shared/register-csv'

const SITE_BATCH = 500

type Show = 'active' | 'archived' | 'all'
const text = (v: string) => guardCell(v)
const number = (v: string | number | null) => (v === null ? '' : String(Number(v)))

// A UTF-8 byte-order mark lets spreadsheet programs read accents correctly; the import skips it.
const BOM = '\uFEFF'

async function* siteBatches(orgId: string, show: Show) {
  let after = ''
  for (;;) {
    let q = useDb().selectFrom('sites')
      .select(['id', 'code', 'name', 'kind', 'latitude', 'longitude', 'voltage_kv', 'access_notes', 'safety_notes', 'safety_flags'])
      .where('organisation_id', '=', orgId).where('code', '>', after)
    if (show === 'active') q = q.where('archived_at', 'is', null)
    if (show === 'archived') q = q.where('archived_at', 'is not', null)
    const rows = await q.orderBy('code').limit(SITE_BATCH).execute()
    if (!rows.length) return
    yield rows
    after = rows[rows.length - 1]!.code
  }
}

/** The organisation's sites as a CSV stream (keyset pages by code). */
export function exportSites(orgId: string, show: Show): Readable {
  return Readable.from((async function* () {
    yield BOM + csvLine(SITE_CSV_COLUMNS.map((c) => c.name))
    for await (const rows of siteBatches(orgId, show)) {
      yield rows.map((s) => csvLine([
        text(s.code), text(s.name), s.kind, number(s.latitude), number(s.longitude), number(s.voltage_kv),
        text(s.access_notes), text(s.safety_notes), s.safety_flags.join(';'),
      ])).join('')
    }
  })())
}

/** The organisation's assets as a CSV stream, site by site (sites in code order, assets by label). */
export function exportAssets(orgId: string, show: Show): Readable {
  return Readable.from((async function* () {
    yield BOM + csvLine(ASSET_CSV_COLUMNS.map((c) => c.name))
    // Sites are walked in all states: an archived asset may sit at an active site.
    for await (const sites of siteBatches(orgId, 'all')) {
      const codes = new Map(sites.map((s) => [s.id, s.code]))
      let q = useDb().selectFrom('assets')
        .select(['site_id', 'label', 'asset_class', 'manufacturer', 'model', 'voltage_kv', 'rated_current_a', 'criticality', 'condition', 'components', 'interval_months'])
        .where('organisation_id', '=', orgId).where('site_id', 'in', [...codes.keys()])
      if (show === 'active') q = q.where('archived_at', 'is', null)
      if (show === 'archived') q = q.where('archived_at', 'is not', null)
      const rows = await q.execute()
      rows.sort((a, b) => (codes.get(a.site_id)! < codes.get(b.site_id)! ? -1 : codes.get(a.site_id)! > codes.get(b.site_id)! ? 1 : a.label.toLowerCase() < b.label.toLowerCase() ? -1 : a.label.toLowerCase() > b.label.toLowerCase() ? 1 : 0))
      if (!rows.length) continue
      yield rows.map((a) => csvLine([
        text(codes.get(a.site_id)!), text(a.label), a.asset_class, text(a.manufacturer), text(a.model), number(a.voltage_kv),
        number(a.rated_current_a), a.criticality, a.condition, text(a.components.join(';')), a.interval_months ?? '',
      ])).join('')
    }
  })())
}
