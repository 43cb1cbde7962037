import type { ScheduleRule, Band } from '#shared/schedule'
import { todayIn } from '#shared/schedule'

export interface ProgrammeSettings {
  timeZone: string
  /** Today in the organisation's time zone (YYYY-MM-DD). */
  today: string
  rule: ScheduleRule
  roadFactor: number
  averageSpeedKmh: number
}

/** The organisation's schedule and travel settings, with today's date in its time zone. */
export async function programmeSettings(orgId: string): Promise<ProgrammeSettings> {
  const o = await useDb().selectFrom('organisations')
    .select(['time_zone', 'road_factor', 'average_speed_kmh', 'interval_months_normal', 'interval_months_condition3', 'monitor_bands', 'monitor_factor'])
    .where('id', '=', orgId)
    .executeTakeFirstOrThrow()
  return {
    timeZone: o.time_zone,
    today: todayIn(o.time_zone),
    rule: {
      normalMonths: o.interval_months_normal,
      condition3Months: o.interval_months_condition3,
      monitorBands: o.monitor_bands.map(Number) as Band[],
      monitorFactor: Number(o.monitor_factor),
    },
    roadFactor: Number(o.road_factor),
    averageSpeedKmh: Number(o.average_speed_kmh),
  }
}
