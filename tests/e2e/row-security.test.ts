// The tenant wall (db/tenant-wall.ts): PostgreSQL row-level security on every table with an organisation_id, behind
// the app's own organisation conditions. Checked three ways: the catalog (a new tenant table without the wall fails
// here), raw connections as the app role (what a connection set for one organisation can see and write), and the
// running app (each request's connections are set to the organisation requireMember resolved).
import pg from 'pg'
import { sql } from 'kysely'
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest'
import { resetDatabase, testDb } from '../support/db'
import { makeOrg, surveyWith, withToken, type Org } from '../support/integration-fixtures'
import { TENANT_POLICY } from '../../db/tenant-wall'

type TestOrg = Org & { id: string; token: string }
let a: TestOrg
let b: TestOrg
let tenantTables: string[] = []
const raw: pg.Client[] = []

/** A connection as the app role, straight to PostgreSQL, with `greybody.org` as given (undefined: never set). */
async function rawConnection(setting?: string): Promise<pg.Client> {
  const client = new pg.Client({ connectionString: inject('databaseUrl'), ...(setting === undefined ? {} : { options: `-c greybody.org=${setting}` }) })
  await client.connect()
  raw.push(client)
  return client
}

/** Rows of each tenant table per organisation, read as system work (the test connection runs with '*'). */
async function rowsPerOrganisation(table: string): Promise<Map<string, number>> {
  const { rows } = await sql<{ org: string | null; n: number }>`
    select organisation_id::text as org, count(*)::int as n from ${sql.table(table)} group by 1`.execute(testDb())
  return new Map(rows.map((r) => [r.org ?? 'null', r.n]))
}

async function buildOrg(prefix: string): Promise<TestOrg> {
  const org = await makeOrg(prefix, ['T1', 'CB1'])
  const { findingIds } = await surveyWith(org, '2026-06-02', [{ asset: 'T1', component: 'Line-side lug', phase: 'L1', apparentC: 64, referenceC: 38 }])
  const wo = await org.owner.post(`/api/orgs/${org.slug}/work-orders`, { findingIds })
  expect(wo.status, JSON.stringify(wo.body)).toBe(201)
  const inv = await org.owner.post(`/api/orgs/${org.slug}/invitations`, { email: `${prefix}-crew@rls.test`, role: 'crew' })
  expect(inv.status, JSON.stringify(inv.body)).toBeLessThan(300)
  const token = await org.owner.post(`/api/orgs/${org.slug}/api-tokens`, { name: 'Asset system', scope: 'read' })
  expect(token.status, JSON.stringify(token.body)).toBe(201)
  expect((await withToken(inject('baseUrl'), token.body.secret, 'GET', `/api/orgs/${org.slug}/sites`)).status).toBe(200)
  const row = await testDb().selectFrom('organisations').select('id').where('slug', '=', org.slug).executeTakeFirstOrThrow()
  return { ...org, id: row.id, token: token.body.secret as string }
}

beforeAll(async () => {
  await resetDatabase()
  a = await buildOrg('rlsa')
  b = await buildOrg('rlsb')
  const { rows } = await sql<{ table: string }>`
    select c.relname as table from pg_class c join pg_namespace n on n.oid = c.relnamespace
    where n.nspname = 'public' and c.relkind in ('r', 'p')
      and exists (select 1 from pg_attribute at where at.attrelid = c.oid and at.attname = 'organisation_id' and not at.attisdropped)
    order by 1`.execute(testDb())
  tenantTables = rows.map((r) => r.table)
}, 180_000)

afterAll(async () => {
  await Promise.all(raw.map((c) => c.end().catch(() => {})))
})

describe('the catalog', () => {
  it('puts every table with an organisation_id behind the wall: enabled, forced, and the tenant_wall policy alone', async () => {
    expect(tenantTables.length).toBeGreaterThanOrEqual(32)
    const { rows } = await sql<{ table: string; enabled: boolean; forced: boolean; policies: string[]; quals: string[] }>`
      select c.relname as table, c.relrowsecurity as enabled, c.relforcerowsecurity as forced,
        coalesce(array_agg(p.polname::text order by p.polname) filter (where p.polname is not null), '{}') as policies,
        coalesce(array_agg(pg_get_expr(p.polqual, p.polrelid) || ' / ' || pg_get_expr(p.polwithcheck, p.polrelid) || ' / ' || p.polcmd::text)
          filter (where p.polname is not null), '{}') as quals
      from pg_class c join pg_namespace n on n.oid = c.relnamespace left join pg_policy p on p.polrelid = c.oid
      where n.nspname = 'public' and c.relname in (${sql.join(tenantTables)})
      group by c.relname, c.relrowsecurity, c.relforcerowsecurity order by c.relname`.execute(testDb())
    expect(rows.map((r) => r.table)).toEqual(tenantTables)
    const reference = rows.find((r) => r.table === 'sites')!.quals[0]!
    expect(reference).toContain("current_setting('greybody.org'")
    for (const r of rows) {
      expect({ table: r.table, enabled: r.enabled, forced: r.forced, policies: r.policies }, r.table)
        .toEqual({ table: r.table, enabled: true, forced: true, policies: [TENANT_POLICY] })
      // Same condition for reads and writes (polcmd '*' = all commands) on every table: no weaker copy.
      expect(r.quals, r.table).toEqual([reference])
      expect(reference.endsWith(' / *')).toBe(true)
    }
  })

  it('holds the app role to the wall: neither superuser nor allowed to bypass row security', async () => {
    const c = await rawConnection('*')
    const { rows } = await c.query('select rolsuper, rolbypassrls from pg_roles where rolname = current_user')
    expect(rows[0]).toEqual({ rolsuper: false, rolbypassrls: false })
  })
})

describe('a raw connection as the app role', () => {
  it('set for organisation A sees exactly A’s rows in every tenant table and none of B’s', async () => {
    const c = await rawConnection(a.id)
    const withB: string[] = []
    for (const table of tenantTables) {
      const perOrg = await rowsPerOrganisation(table)
      const seen = await c.query(`select organisation_id::text as org, count(*)::int as n from "${table}" group by 1`)
      expect(new Map(seen.rows.map((r) => [r.org, r.n])), table).toEqual(perOrg.has(a.id) ? new Map([[a.id, perOrg.get(a.id)]]) : new Map())
      if (perOrg.has(b.id)) withB.push(table)
    }
    // Not an empty comparison: B has rows in the tables the scenario wrote, and A's connection saw none of them.
    expect(withB).toEqual(expect.arrayContaining([
      'api_token_requests', 'api_tokens', 'assets', 'checks', 'findings', 'instruments', 'invitations', 'memberships',
      'organisation_billing', 'outbox', 'record_events', 'sites', 'survey_sites', 'surveys', 'work_order_findings', 'work_orders',
    ]))
  })

  it('cannot look up one of B’s rows by its id', async () => {
    const c = await rawConnection(a.id)
    const res = await c.query('select id from sites where id = $1', [b.siteId])
    expect(res.rowCount).toBe(0)
    expect((await testDb().selectFrom('sites').select('id').where('id', '=', b.siteId).execute()).length).toBe(1)
  })

  it('cannot write a row into B, nor move one of A’s rows there, nor change or delete B’s rows', async () => {
    const c = await rawConnection(a.id)
    await expect(c.query(`insert into sites (organisation_id, code, name, kind) values ($1, 'RLS-X', 'Planted', 'substation')`, [b.id]))
      .rejects.toThrow(/row-level security policy/)
    await expect(c.query('update sites set organisation_id = $1 where id = $2', [b.id, a.siteId])).rejects.toThrow(/row-level security policy/)
    const renamed = await c.query(`update sites set name = 'Taken over' where id = $1`, [b.siteId])
    expect(renamed.rowCount).toBe(0)
    const deleted = await c.query('delete from work_order_findings where organisation_id = $1', [b.id])
    expect(deleted.rowCount).toBe(0)
    // B's rows are as they were; A may still write its own.
    const site = await testDb().selectFrom('sites').select(['name', 'organisation_id']).where('id', '=', b.siteId).executeTakeFirstOrThrow()
    expect(site).toEqual({ name: 'rlsb grid', organisation_id: b.id })
    expect((await testDb().selectFrom('work_order_findings').select('finding_id').where('organisation_id', '=', b.id).execute()).length).toBe(1)
    expect((await testDb().selectFrom('sites').select('id').where('code', '=', 'RLS-X').execute()).length).toBe(0)
    const own = await c.query(`update sites set access_notes = 'Gate code at the depot' where id = $1`, [a.siteId])
    expect(own.rowCount).toBe(1)
  })

  it('with no setting, or an empty one, sees nothing in any tenant table (closed by default)', async () => {
    const unset = await rawConnection()
    const empty = await rawConnection('')
    expect((await unset.query(`select current_setting('greybody.org', true) as v`)).rows[0].v).toBeNull()
    let rowsThere = 0
    for (const table of tenantTables) {
      const total = [...(await rowsPerOrganisation(table)).values()].reduce((s, n) => s + n, 0)
      rowsThere += total
      expect(Number((await unset.query(`select count(*) from "${table}"`)).rows[0].count), table).toBe(0)
      expect(Number((await empty.query(`select count(*) from "${table}"`)).rows[0].count), table).toBe(0)
    }
    expect(rowsThere).toBeGreaterThan(50)
    await expect(unset.query(`insert into sites (organisation_id, code, name, kind) values ($1, 'RLS-Y', 'Planted', 'substation')`, [a.id]))
      .rejects.toThrow(/row-level security policy/)
  })

  it('refuses to run with a setting that is neither an organisation id nor *', async () => {
    const c = await rawConnection('not-an-organisation')
    await expect(c.query('select count(*) from sites')).rejects.toThrow(/invalid input syntax for type uuid/)
  })
})

describe('the running app', () => {
  const hook = (org: Org) => `/api/dev/orgs/${org.slug}/tenant-wall`

  it('sets each request’s connections to the organisation it resolved, for queries and transactions alike', async () => {
    const systemSites = await testDb().selectFrom('sites').select('organisation_id').execute()
    expect(new Set(systemSites.map((s) => s.organisation_id))).toEqual(new Set([a.id, b.id]))
    for (const org of [a, b, a]) {
      const res = await org.owner.get(hook(org))
      expect(res.status, JSON.stringify(res.body)).toBe(200)
      // The hook counts sites without any organisation condition: only the wall can narrow them to this organisation.
      expect(res.body).toEqual({
        organisationId: org.id, setting: org.id, settingInTransaction: org.id, settingForSystemWork: '*',
        visibleSites: systemSites.filter((s) => s.organisation_id === org.id).length, visibleOrganisations: 1,
      })
    }
  })

  it('does the same for a request made with an API token', async () => {
    const res = await withToken(inject('baseUrl'), b.token, 'GET', hook(b))
    expect(res.status, res.text).toBe(200)
    expect(res.body).toMatchObject({ organisationId: b.id, setting: b.id, visibleOrganisations: 1 })
  })

  it('still answers tenant requests with the organisation’s own data, and requests outside any organisation', async () => {
    const sites = await a.owner.get(`/api/orgs/${a.slug}/sites`)
    expect(sites.status).toBe(200)
    expect(sites.body.items.map((s: { id: string }) => s.id)).toEqual([a.siteId])
    const wos = await b.owner.get(`/api/orgs/${b.slug}/work-orders`)
    expect(wos.status).toBe(200)
    expect(wos.body.total ?? wos.body.items.length).toBe(1)
    // Another organisation's slug is still a plain 404 from requireMember (the first wall), not an error of the second.
    expect((await a.owner.get(`/api/orgs/${b.slug}/sites`)).status).toBe(404)
    // Outside an organisation (the person's own list of organisations) the app works as system: '*'.
    const mine = await a.owner.get('/api/orgs')
    expect(mine.status).toBe(200)
    expect(JSON.stringify(mine.body)).toContain(a.slug)
  })
})
