import { sql } from 'kysely'
import { organisationUpdateSchema } from '#shared/schemas/organisation'
import { changesOf, record } from '~~/server/services/audit'

export default defineEventHandler(async (event) => {
  const ctx = await requireMember(event, { permission: 'organisation.manage' })
  const input = await bodyOf(event, organisationUpdateSchema)
  // Optimistic locking: a stale form (someone saved in between) is refused instead of silently overwriting.
  const row = await useDb().transaction().execute(async (trx) => {
    const before = await trx.selectFrom('organisations')
      .select(['name', 'load_exponent', 'time_zone', 'road_factor', 'average_speed_kmh', 'interval_months_normal', 'interval_months_condition3', 'monitor_bands', 'monitor_factor'])
      .where('id', '=', ctx.org.id).where('version', '=', input.version).forUpdate().executeTakeFirst()
    if (!before) return undefined
    const updated = await trx.updateTable('organisations')
      .set({
        ...(input.name && { name: input.name }),
        ...(input.loadExponent !== undefined && { load_exponent: input.loadExponent }),
        ...(input.timeZone && { time_zone: input.timeZone }),
        ...(input.roadFactor !== undefined && { road_factor: input.roadFactor }),
        ...(input.averageSpeedKmh !== undefined && { average_speed_kmh: input.averageSpeedKmh }),
        ...(input.intervalMonthsNormal !== undefined && { interval_months_normal: input.intervalMonthsNormal }),
        ...(input.intervalMonthsCondition3 !== undefined && { interval_months_condition3: input.intervalMonthsCondition3 }),
        ...(input.monitorBands !== undefined && { monitor_bands: input.monitorBands }),
        ...(input.monitorFactor !== undefined && { monitor_factor: input.monitorFactor }),
        version: sql`version + 1`,
        updated_at: new Date(),
      })
      .where('id', '=', ctx.org.id)
      .where('version', '=', input.version)
      .returning(['slug', 'name', 'load_exponent', 'time_zone', 'version'])
      .executeTakeFirst()
    const { version: _version, ...asked } = input
    const changes = changesOf({
      name: before.name, loadExponent: Number(before.load_exponent), timeZone: before.time_zone, roadFactor: Number(before.road_factor),
      averageSpeedKmh: Number(before.average_speed_kmh), intervalMonthsNormal: before.interval_months_normal,
      intervalMonthsCondition3: before.interval_months_condition3, monitorBands: before.monitor_bands, monitorFactor: Number(before.monitor_factor),
    } as Record<string, unknown>, asked)
    if (updated && Object.keys(changes).length) {
      await record(trx, { ctx, action: 'organisation.settings_changed', target: { kind: 'organisation', id: ctx.org.id, label: updated.name }, details: { changes } })
    }
    return updated
  })
  if (!row) {
    throw createError({ statusCode: 409, statusMessage: 'Changed meanwhile', data: { message: 'Someone else changed these settings while you were editing. Reload to see their changes, then try again.' } })
  }
  return { slug: row.slug, name: row.name, loadExponent: Number(row.load_exponent), timeZone: row.time_zone, version: row.version }
})
