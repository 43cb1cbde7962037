export default defineEventHandler(async (event) => {
  const ctx = await requireMember(event, { permission: 'organisation.view' })
  const org = await useDb().selectFrom('organisations')
    .select(['slug', 'name', 'load_exponent', 'time_zone', 'version', 'created_at'])
    .select(['road_factor', 'average_speed_kmh', 'interval_months_normal', 'interval_months_condition3', 'monitor_bands', 'monitor_factor'])
    .where('id', '=', ctx.org.id)
    .executeTakeFirstOrThrow()
  const [sites, assets] = await Promise.all([
    useDb().selectFrom('sites').select((eb) => eb.fn.countAll<number>().as('n'))
      .where('organisation_id', '=', ctx.org.id).where('archived_at', 'is', null).executeTakeFirstOrThrow(),
    useDb().selectFrom('assets').select((eb) => eb.fn.countAll<number>().as('n'))
      .where('organisation_id', '=', ctx.org.id).where('archived_at', 'is', null).executeTakeFirstOrThrow(),
  ])
  return {
    slug: org.slug,
    name: org.name,
    loadExponent: Number(org.load_exponent),
    timeZone: org.time_zone,
    version: org.version,
    createdAt: org.created_at,
    myRole: ctx.member.role,
    counts: { sites: Number(sites.n), assets: Number(assets.n) },
    programme: {
      roadFactor: Number(org.road_factor),
      averageSpeedKmh: Number(org.average_speed_kmh),
      intervalMonthsNormal: org.interval_months_normal,
      intervalMonthsCondition3: org.interval_months_condition3,
      monitorBands: org.monitor_bands.map(Number),
      monitorFactor: Number(org.monitor_factor),
    },
  }
})
