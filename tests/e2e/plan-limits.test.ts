// Plan limits from shared/billing/plans.ts (our own product figures): the trial holds 25 active sites,
// Programme 250, Utility no limit. Archived sites do not count.
import { beforeAll, describe, expect, it } from 'vitest'
import { ApiClient, signUpOwner } from '../support/api'
import { resetDatabase, testDb } from '../support/db'
import { createSite, uploadCsv } from '../support/register'
import { PLANS } from '../../shared/billing/plans'

let owner: ApiClient
let slug: string
let orgId: string

const activeSites = async () =>
  Number((await testDb().selectFrom('sites').select((eb) => eb.fn.countAll().as('n'))
    .where('organisation_id', '=', orgId).where('archived_at', 'is', null).executeTakeFirstOrThrow()).n)

/** Fills the register up to `n` active sites straight in the database (the API path is what is under test). */
async function fillTo(n: number) {
  const have = await activeSites()
  const rows = Array.from({ length: n - have }, (_, i) => ({
    organisation_id: orgId, code: `FILL-${have + i}`, name: `Filler ${have + i}`, kind: 'substation', latitude: 51, longitude: -1,
  }))
  if (rows.length) await testDb().insertInto('sites').values(rows as never).execute()
}

beforeAll(async () => {
  await resetDatabase()
  ;({ client: owner, slug } = await signUpOwner('Ines Ward', 'ines@limits.test', 'Limit Vale Energy'))
  orgId = (await testDb().selectFrom('organisations').select('id').where('slug', '=', slug).executeTakeFirstOrThrow()).id
})

describe('site limit of the plan', () => {
  const limit = PLANS.trial.limits.sites!

  it('refuses the site past the trial limit with a plain message, and adds nothing', async () => {
    await fillTo(limit - 1)
    await createSite(owner, slug, { code: 'LAST', name: 'Last place' })
    expect(await activeSites()).toBe(limit)
    const res = await owner.post(`/api/orgs/${slug}/sites`, { code: 'ONE-TOO-MANY', name: 'Over', kind: 'substation', latitude: 51, longitude: -1 })
    expect(res.status).toBe(409)
    expect(res.body.data.message).toContain(`holds up to ${limit} active sites`)
    expect(res.body.data.message).toContain('Billing page')
    expect(await activeSites()).toBe(limit)
  })

  it('counts only active sites: archiving one makes room, restoring it past the limit is refused', async () => {
    const last = await testDb().selectFrom('sites').select(['id', 'version']).where('organisation_id', '=', orgId).where('code', '=', 'LAST').executeTakeFirstOrThrow()
    const archived = await owner.post(`/api/orgs/${slug}/sites/${last.id}/archive`, { version: last.version })
    expect(archived.status).toBe(200)
    await createSite(owner, slug, { code: 'TAKES-ROOM', name: 'Takes the room' })
    const restore = await owner.post(`/api/orgs/${slug}/sites/${last.id}/unarchive`, { version: archived.body.version })
    expect(restore.status).toBe(409)
    expect(await activeSites()).toBe(limit)
  })

  it('refuses a sites import that would pass the limit as a whole, importing none of it', async () => {
    const text = 'code,name,kind,latitude,longitude\r\nIMP-1,Imported one,substation,51,-1\r\nIMP-2,Imported two,substation,51,-1\r\n'
    const check = await uploadCsv(owner, slug, 'sites', text)
    expect(check.status, JSON.stringify(check.body)).toBe(200)
    const commit = await owner.post(`/api/orgs/${slug}/register-imports/${check.body.id}/commit`)
    expect(commit.status).toBe(409)
    expect(commit.body.data.message).toContain('this would add 2 (room for 0)')
    expect(await activeSites()).toBe(limit)
  })

  it('lifts the limit on a plan without one', async () => {
    await testDb().updateTable('organisation_billing').set({ plan: 'utility' }).where('organisation_id', '=', orgId).execute()
    expect(PLANS.utility.limits.sites).toBeNull()
    const res = await owner.post(`/api/orgs/${slug}/sites`, { code: 'UTIL-1', name: 'No limit', kind: 'substation', latitude: 51, longitude: -1 })
    expect(res.status, JSON.stringify(res.body)).toBe(201)
    expect(await activeSites()).toBe(limit + 1)
  })
})
