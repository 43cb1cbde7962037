import type { Browser } from 'playwright-core'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { ApiClient, linkIn, mailFor, signUpOwner } from '../support/api'
import { expectAccessible, launchBrowser, newSession, signInWithForm } from '../support/browser'
import { resetDatabase, testDb } from '../support/db'

// The field screen without a connection: what is saved is kept on the phone, shown as waiting, and sent exactly
// once when the connection returns.

let browser: Browser
let slug: string
let surveyId: string
let thermo: ApiClient
const email = 'nia@offline.test'
const password = 'offline thermographer password'

beforeAll(async () => {
  await resetDatabase()
  const { client: owner, slug: s } = await signUpOwner('Oda Owner', 'oda@offline.test', 'Oda Networks')
  slug = s
  await owner.post(`/api/orgs/${slug}/invitations`, { email, role: 'thermographer' })
  const [mail] = await mailFor(email)
  const token = linkIn(mail!.text, '/invitations/').split('/invitations/')[1]!
  thermo = new ApiClient()
  const joined = await thermo.post('/api/account/sign-up', { name: 'Nia Thermographer', email, password, invitationToken: token })
  await thermo.signIn(email, password)
  const site = await owner.post(`/api/orgs/${slug}/sites`, { code: 'MOS', name: 'Mossgate', kind: 'substation', latitude: 52.1, longitude: -1.2 })
  for (const label of ['CB1', 'T1']) await owner.post(`/api/orgs/${slug}/assets`, { siteId: site.body.id, label, assetClass: 'breaker' })
  const inst = await owner.post(`/api/orgs/${slug}/instruments`, { make: 'Halden', model: 'T8', serial: 'OFF-1', bandFromUm: 8, bandToUm: 14 })
  const survey = await owner.post(`/api/orgs/${slug}/surveys`, { plannedFor: '2026-12-02', thermographerId: joined.body.user.id, instrumentId: inst.body.id, siteIds: [site.body.id] })
  surveyId = survey.body.id
  await thermo.post(`/api/orgs/${slug}/surveys/${surveyId}/start`, { version: survey.body.version })
  browser = await launchBrowser()
})
afterAll(async () => {
  await browser?.close()
})

describe('the field screen without a connection', () => {
  it('keeps a check and a finding on the phone, then sends each exactly once', async () => {
    const { context, page } = await newSession(browser, { phone: true })
    await signInWithForm(page, email, password)
    await page.goto(`/orgs/${slug}/surveys/${surveyId}`)
    await expect.poll(() => page.getByText('Site 1 of 1').count()).toBe(1)

    await context.setOffline(true)
    await expect.poll(() => page.getByText(/No connection: what you save is kept on this phone/).count()).toBe(1)
    const cb1 = page.locator('li[data-asset="CB1"]')
    await cb1.getByRole('button', { name: 'Clear' }).click()
    await expect.poll(() => page.getByTestId('outbox-count').textContent()).toBe('1')

    const t1 = page.locator('li[data-asset="T1"]')
    await t1.getByRole('button', { name: 'Finding' }).click()
    const form = page.getByRole('form', { name: 'Finding' })
    await form.getByLabel('Component').fill('Line-side connector')
    await form.getByLabel('Hot spot, apparent (°C)').fill('50')
    await form.getByLabel('Ambient air (°C)').fill('20')
    await form.getByLabel('Emissivity ε').fill('0.5')
    await form.getByLabel('Reflected (°C)').fill('20')
    await form.getByLabel('Probable cause').selectOption('loose_connection')
    await form.getByRole('button', { name: 'Save finding' }).click()
    await expect.poll(() => form.count()).toBe(0)
    await expect.poll(() => page.getByRole('heading', { name: /waiting to be sent: 2/i }).count()).toBe(1)
    await expect.poll(() => t1.getByTestId('asset-queued').textContent()).toContain('Finding · T1 · Line-side connector')
    // Nothing reached the server while offline.
    expect((await testDb().selectFrom('checks').select('id').where('survey_id', '=', surveyId).execute())).toHaveLength(0)
    await expectAccessible(page, 'field screen with records waiting')

    // Kept on the device: a reload while still offline is not possible, but the records are in IndexedDB.
    const stored = await page.evaluate(() => new Promise<number>((resolve, reject) => {
      const req = indexedDB.open('greybody-field')
      req.onsuccess = () => {
        const tx = req.result.transaction('records', 'readonly')
        const c = tx.objectStore('records').count()
        c.onsuccess = () => resolve(c.result)
        c.onerror = () => reject(c.error)
      }
      req.onerror = () => reject(req.error)
    }))
    expect(stored).toBe(2)

    await context.setOffline(false)
    await expect.poll(() => t1.textContent(), { timeout: 20_000 }).toContain('74.3 °C · band 1')
    await expect.poll(() => cb1.locator('p[aria-live]').textContent()).toContain('Clear')
    await expect.poll(() => page.getByTestId('outbox-count').count()).toBe(0)
    await expect.poll(() => page.getByText('2 of 2 assets checked').count()).toBe(1)
    await expectAccessible(page, 'field screen after sending')

    // Exactly one copy of each, through the API and in the database; a reload sends nothing again.
    await page.reload()
    await expect.poll(() => page.getByText('Site 1 of 1').count()).toBe(1)
    const survey = await thermo.get(`/api/orgs/${slug}/surveys/${surveyId}`)
    const assets = survey.body.sites[0].assets as Array<{ label: string; check: { outcome: string } | null; findings: unknown[] }>
    expect(assets.map((a) => [a.label, a.check?.outcome, a.findings.length])).toEqual([['CB1', 'clear', 0], ['T1', 'finding', 1]])
    const checks = await testDb().selectFrom('checks').select(['id', 'version']).where('survey_id', '=', surveyId).execute()
    expect(checks).toHaveLength(2)
    const findings = await testDb().selectFrom('findings').select('id').where('check_id', 'in', checks.map((c) => c.id)).execute()
    expect(findings).toHaveLength(1)
    expect(await testDb().selectFrom('idempotency_keys').select('id').execute()).toHaveLength(2)
    await context.close()
  })

  it('shows a record the server refuses beside it, with the reason, until the person discards it', async () => {
    const { context, page } = await newSession(browser, { phone: true })
    await signInWithForm(page, email, password)
    await page.goto(`/orgs/${slug}/surveys/${surveyId}`)
    await expect.poll(() => page.getByText('Site 1 of 1').count()).toBe(1)
    // Offline, T1 (which holds a finding from the first test) is tapped clear; the server will refuse that.
    await context.setOffline(true)
    const t1 = page.locator('li[data-asset="T1"]')
    await t1.getByRole('button', { name: 'Clear' }).click()
    await expect.poll(() => page.getByTestId('outbox-count').textContent()).toBe('1')
    await context.setOffline(false)
    await expect.poll(() => page.getByText('Not accepted').count(), { timeout: 20_000 }).toBe(1)
    await expect.poll(() => page.getByText(/already has findings recorded on this survey/).count()).toBeGreaterThan(0)
    // Still on the phone after a reload, with the server's answer beside it.
    await page.reload()
    await expect.poll(() => page.getByText('Not accepted').count()).toBe(1)
    await expect.poll(() => page.getByText(/already has findings recorded on this survey/).count()).toBeGreaterThan(0)
    await expectAccessible(page, 'field screen with a refused record')
    await page.getByRole('button', { name: 'Discard…' }).click()
    await page.getByRole('button', { name: 'Discard for good' }).click()
    await expect.poll(() => page.getByText('Not accepted').count()).toBe(0)
    await context.close()
  })
})

describe('review and history', () => {
  it('lets a manager correct a band with a reason, and shows it corrected in the asset history', async () => {
    const detail = await thermo.get(`/api/orgs/${slug}/surveys/${surveyId}`)
    expect((await thermo.post(`/api/orgs/${slug}/surveys/${surveyId}/submit`, { version: detail.body.version })).status).toBe(200)
    const t1Id = detail.body.sites[0].assets.find((a: { label: string }) => a.label === 'T1').id as string
    const { context, page } = await newSession(browser)
    await signInWithForm(page, 'oda@offline.test', 'correct horse battery')
    await page.goto(`/orgs/${slug}/surveys/${surveyId}/review`)
    await expect.poll(() => page.getByText('Sites planned').count()).toBe(1)
    await page.getByRole('button', { name: 'Correct the band…' }).click()
    const form = page.getByRole('form', { name: /Correct the band of Line-side connector/ })
    await form.getByLabel('Reviewed band').selectOption('2')
    await form.getByLabel('Why').fill('short')
    await form.getByRole('button', { name: 'Save reviewed band' }).click()
    await expect.poll(() => form.getByText(/at least 10 characters/).count()).toBeGreaterThan(0)
    await form.getByLabel('Why').fill('Load on the day was well above normal; the rise at normal load is in band 2.')
    await form.getByRole('button', { name: 'Save reviewed band' }).click()
    await expect.poll(() => page.getByTestId('finding-review').textContent()).toContain('Computed band: 1 · reviewed band: 2, by Oda Owner')
    await expect.poll(() => page.getByText('Band 2 · corrected').count()).toBe(1)
    await expectAccessible(page, 'review with a corrected band')

    await page.goto(`/orgs/${slug}/assets/${t1Id}`)
    await expect.poll(() => page.getByTestId('history-item').count()).toBe(1)
    expect(await page.getByTestId('history-item').textContent()).toContain('corrected (computed 1)')
    await expectAccessible(page, 'asset page with its history')
    await context.close()
  })
})
