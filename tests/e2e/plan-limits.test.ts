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

  it('refuses an image upload that would pass the plan\'s storage, before any upload link is made', async () => {
    // A survey the owner runs themself (owners hold surveys.run), one finding to attach to.
    const site = await testDb().selectFrom('sites').select('id').where('organisation_id', '=', orgId).where('code', '=', 'TAKES-ROOM').executeTakeFirstOrThrow()
    const asset = await owner.post(`/api/orgs/${slug}/assets`, { siteId: site.id, label: 'T1', assetClass: 'transformer' })
    const inst = await owner.post(`/api/orgs/${slug}/instruments`, { make: 'Halden', model: 'T8', serial: 'PL-1', bandFromUm: 8, bandToUm: 14 })
    const me = await testDb().selectFrom('users').select('id').where('email', '=', 'ines@limits.test').executeTakeFirstOrThrow()
    const survey = await owner.post(`/api/orgs/${slug}/surveys`, { plannedFor: '2026-12-02', thermographerId: me.id, instrumentId: inst.body.id, siteIds: [site.id] })
    expect(survey.status, JSON.stringify(survey.body)).toBe(201)
    await owner.post(`/api/orgs/${slug}/surveys/${survey.body.id}/start`, { version: survey.body.version })
    const finding = await owner.post(`/api/orgs/${slug}/surveys/${survey.body.id}/findings`, {
      assetId: asset.body.id, component: 'Clamp', apparentC: 48, ambientC: 18, emissivity: 0.9, reflectedC: 18, reflectedMethod: 'reflector', probableCause: 'loose_connection',
    })
    expect(finding.status, JSON.stringify(finding.body)).toBe(201)
    const begin = (sizeBytes: number) => owner.post(`/api/orgs/${slug}/findings/${finding.body.id}/attachments`, { kind: 'infrared', fileName: 'IR.png', contentType: 'image/png', sizeBytes })
    const allowance = PLANS.trial.limits.storageGb! * 1024 ** 3
    // Stored images worth the allowance less 1 MB (rows only: the limit counts what the records say is stored).
    const each = 25 * 1024 * 1024
    const full = Math.floor((allowance - 1024 * 1024) / each)
    const rest = allowance - 1024 * 1024 - full * each
    const rows = [...Array.from({ length: full }, () => each), rest].map((size) => ({
      organisation_id: orgId, subject_kind: 'finding', subject_id: finding.body.id, kind: 'infrared', file_name: 'old.png',
      content_type: 'image/png', size_bytes: size, object_key: `orgs/${orgId}/attachments/x/original.png`, state: 'stored', stored_at: new Date(),
    }))
    await testDb().insertInto('attachments').values(rows as never).execute()
    const refused = await begin(2 * 1024 * 1024)
    expect(refused.status).toBe(409)
    expect(refused.body.data.fieldErrors.file[0]).toContain('plan holds 10 GB of files')
    // 1 MB still fits.
    expect((await begin(1024 * 1024)).status).toBe(201)
    const billing = await owner.get(`/api/orgs/${slug}/billing`)
    expect(billing.body.usage.storageBytes).toBe(allowance - 1024 * 1024)
  })

  it('lifts the limit on a plan without one', async () => {
    await testDb().updateTable('organisation_billing').set({ plan: 'utility' }).where('organisation_id', '=', orgId).execute()
    expect(PLANS.utility.limits.sites).toBeNull()
    const res = await owner.post(`/api/orgs/${slug}/sites`, { code: 'UTIL-1', name: 'No limit', kind: 'substation', latitude: 51, longitude: -1 })
    expect(res.status, JSON.stringify(res.body)).toBe(201)
    expect(await activeSites()).toBe(limit + 1)
  })
})
