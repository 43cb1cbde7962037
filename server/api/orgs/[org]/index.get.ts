export default defineEventHandler(async (event) => {
  const ctx = await requireMember(event, { permission: 'organisation.view' })
  const org = await useDb().selectFrom('organisations')
    .select(['slug', 'name', 'load_exponent', 'time_zone', 'version', 'created_at'])
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
  }
})
