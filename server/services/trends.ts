// Trends of an asset's components: every reading of the same component and phase (findings over surveys, and
// verification re-scans after repairs), fitted and projected with shared/trends.ts.
import { sql } from 'kysely'
import type { z } from 'zod'
import { buildTrend, type TrendReading } from '#shared/trends'
import { criteriaSetById } from '#shared/thermal/criteria'
import type { trendQuerySchema } from '#shared/schemas/trends'
import type { AssetTrends, ComponentTrend } from '#shared/types/trends'

const keyOf = (component: string, phase: string) => `${component.trim().toLowerCase()}\u0000${phase.trim().toLowerCase()}`

/** The trends of one asset, one per component and phase, most readings first. */
export async function assetTrends(ctx: MemberContext, assetId: string, q: z.output<typeof trendQuerySchema>): Promise<AssetTrends> {
  const db = useDb()
  const asset = await db.selectFrom('assets').select(['id', 'label']).where('organisation_id', '=', ctx.org.id).where('id', '=', assetId).executeTakeFirst()
  if (!asset) throw notFound('Asset')
  const findings = await db.selectFrom('findings as f')
    .innerJoin('checks as c', (j) => j.onRef('c.organisation_id', '=', 'f.organisation_id').onRef('c.id', '=', 'f.check_id'))
    .innerJoin('surveys as s', (j) => j.onRef('s.organisation_id', '=', 'c.organisation_id').onRef('s.id', '=', 'c.survey_id'))
    .select(['f.id', 'f.component', 'f.phase', 'f.rise_over_reference_k', 'f.rise_over_ambient_k', 'f.load_a', 'f.rated_a', 'f.criteria_id', 'f.created_at'])
    .select(sql<number | null>`coalesce(f.reviewed_band, f.band)`.as('band'))
    .select(sql<string>`to_char(s.planned_for, 'YYYY-MM-DD')`.as('day'))
    .where('f.organisation_id', '=', ctx.org.id).where('c.asset_id', '=', assetId)
    .where('f.archived_at', 'is', null).where('s.archived_at', 'is', null)
    .execute()
  // Re-scans after a repair belong to the component of the finding they verify.
  const verifications = await db.selectFrom('verifications as v')
    .innerJoin('findings as f', (j) => j.onRef('f.organisation_id', '=', 'v.organisation_id').onRef('f.id', '=', 'v.finding_id'))
    .innerJoin('checks as c', (j) => j.onRef('c.organisation_id', '=', 'f.organisation_id').onRef('c.id', '=', 'f.check_id'))
    .select(['v.id', 'f.component', 'f.phase', 'v.rise_over_reference_k', 'v.rise_over_ambient_k', 'v.load_a', 'v.rated_a', 'v.band', 'v.criteria_id', 'v.recorded_at'])
    .select(sql<string>`to_char(v.recorded_at at time zone 'UTC', 'YYYY-MM-DD')`.as('day'))
    .where('v.organisation_id', '=', ctx.org.id).where('c.asset_id', '=', assetId)
    .where('v.state', 'in', ['passed', 'failed']).where('v.recorded_at', 'is not', null)
    .where('f.archived_at', 'is', null)
    .execute()

  const groups = new Map<string, { component: string; phase: string; readings: Array<TrendReading & { criteriaId: string | null; at: number }> }>()
  const add = (component: string, phase: string, r: TrendReading & { criteriaId: string | null; at: number }) => {
    const key = keyOf(component, phase)
    const g = groups.get(key) ?? { component: component.trim(), phase: phase.trim(), readings: [] }
    g.readings.push(r)
    groups.set(key, g)
  }
  for (const f of findings) {
    add(f.component, f.phase, {
      id: f.id, date: f.day, source: 'finding', riseOverReferenceK: f.rise_over_reference_k, riseOverAmbientK: f.rise_over_ambient_k,
      loadA: f.load_a, ratedA: f.rated_a, band: f.band, criteriaId: f.criteria_id, at: f.created_at.getTime(),
    })
  }
  for (const v of verifications) {
    add(v.component, v.phase, {
      id: v.id, date: v.day, source: 'verification', riseOverReferenceK: v.rise_over_reference_k, riseOverAmbientK: v.rise_over_ambient_k,
      loadA: v.load_a, ratedA: v.rated_a, band: v.band, criteriaId: v.criteria_id, at: v.recorded_at!.getTime(),
    })
  }
  const wanted = q.component ? keyOf(q.component, q.phase ?? '') : null
  const components: ComponentTrend[] = []
  for (const [key, g] of groups) {
    if (wanted && key !== wanted) continue
    // The criteria set of the newest reading draws the edges.
    const newest = [...g.readings].sort((a, b) => (a.date === b.date ? b.at - a.at : a.date < b.date ? 1 : -1))[0]!
    const criteria = criteriaSetById(newest.criteriaId ?? undefined)
    const readings = g.readings.map(({ criteriaId: _c, at: _a, ...r }) => r)
    components.push({ component: g.component, phase: g.phase, criteriaId: criteria.id, criteriaName: criteria.name, ...buildTrend(readings, criteria) })
  }
  // Ordered on the normalised key: the spelling shown is the first one met, which must not decide the order.
  components.sort((a, b) => b.points.length - a.points.length || keyOf(a.component, a.phase).localeCompare(keyOf(b.component, b.phase)))
  return { assetId: asset.id, assetLabel: asset.label, components }
}
