import { sql } from 'kysely'
import { organisationUpdateSchema } from '#shared/schemas/organisation'

export default defineEventHandler(async (event) => {
  const ctx = await requireMember(event, { permission: 'organisation.manage' })
  const input = await bodyOf(event, organisationUpdateSchema)
  // Optimistic locking: a stale form (someone saved in between) is refused instead of silently overwriting.
  const row = await useDb().updateTable('organisations')
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
  if (!row) {
    throw createError({ statusCode: 409, statusMessage: 'Changed meanwhile', data: { message: 'Someone else changed these settings while you were editing. Reload to see their changes, then try again.' } })
  }
  return { slug: row.slug, name: row.name, loadExponent: Number(row.load_exponent), timeZone: row.time_zone, version: row.version }
})
