import type { Browser } from 'playwright-core'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { ApiClient, linkIn, mailFor, signUpOwner } from '../support/api'
import { expectAccessible, launchBrowser, newSession } from '../support/browser'
import { resetDatabase } from '../support/db'

let browser: Browser
let slug: string
let surveyId: string
const email = 'tia@browser-survey.test'
const password = 'thermographer browser password'

beforeAll(async () => {
  await resetDatabase()
  const { client: owner, slug: s } = await signUpOwner('Ora Owner', 'ora@browser-survey.test', 'Ora Networks')
  slug = s
  await owner.post(`/api/orgs/${slug}/invitations`, { email, role: 'thermographer' })
  const [mail] = await mailFor(email)
  const token = linkIn(mail!.text, '/invitations/').split('/invitations/')[1]!
  const thermo = new ApiClient()
  const joined = await thermo.post('/api/account/sign-up', { name: 'Tia Thermographer', email, password, invitationToken: token })
  await thermo.signIn(email, password)
  const site = await owner.post(`/api/orgs/${slug}/sites`, { code: 'OAK', name: 'Oakridge', kind: 'substation', latitude: 52.1, longitude: -1.2 })
  for (const label of ['CB1', 'T1']) await owner.post(`/api/orgs/${slug}/assets`, { siteId: site.body.id, label, assetClass: 'breaker' })
  const inst = await owner.post(`/api/orgs/${slug}/instruments`, { make: 'Halden', model: 'T8', serial: 'B-1', bandFromUm: 8, bandToUm: 14 })
  const survey = await owner.post(`/api/orgs/${slug}/surveys`, { plannedFor: '2026-12-02', thermographerId: joined.body.user.id, instrumentId: inst.body.id, siteIds: [site.body.id] })
  surveyId = survey.body.id
  await thermo.post(`/api/orgs/${slug}/surveys/${surveyId}/start`, { version: survey.body.version })
  browser = await launchBrowser()
})
afterAll(async () => {
  await browser?.close()
})

describe('the field screen on a phone', () => {
  it('records a clear check and a finding with the live band', async () => {
    const { context, page } = await newSession(browser, { phone: true })
    await page.goto('/sign-in')
    await page.getByLabel('E-mail').fill(email)
    await page.getByLabel('Password').fill(password)
    await page.getByRole('button', { name: 'Sign in' }).click()
    await page.waitForURL(/\/orgs\//)
    await page.goto(`/orgs/${slug}/surveys/${surveyId}`)
    await expect.poll(() => page.getByText('Site 1 of 1').count()).toBe(1)
    await expectAccessible(page, 'survey field screen')

    const cb1 = page.locator('li[data-asset="CB1"]')
    const clear = cb1.getByRole('button', { name: 'Clear' })
    // Touch targets at least 44 px (WCAG 2.5.5 / common practice).
    const box = await clear.boundingBox()
    expect(box!.height).toBeGreaterThanOrEqual(44)
    await clear.click()
    await expect.poll(() => cb1.locator('p[aria-live]').textContent()).toContain('Clear')

    const t1 = page.locator('li[data-asset="T1"]')
    await t1.getByRole('button', { name: 'Finding' }).click()
    const form = page.getByRole('form', { name: 'Finding' })
    await form.getByLabel('Component').fill('Line-side connector')
    await form.getByLabel('Hot spot, apparent (°C)').fill('50')
    await form.getByLabel('Ambient air (°C)').fill('20')
    await form.getByLabel('Emissivity ε').fill('0.5')
    await form.getByLabel('Reflected (°C)').fill('20')
    await form.getByLabel('Probable cause').selectOption('loose_connection')
    // Reference sheet §5 [C]: this reading corrects to 74.3 °C, 54 K over ambient → band 1 (ANSI/NETA Table 100.18).
    await expect.poll(() => form.getByTestId('wb-band').textContent()).toContain('Band 1')
    await expect.poll(() => form.getByText(/Safety first/).count()).toBeGreaterThan(0)
    await expectAccessible(page, 'finding form')
    await form.getByRole('button', { name: 'Save finding' }).click()
    await expect.poll(() => t1.textContent()).toContain('74.3 °C · band 1')
    await expect.poll(() => page.getByText('2 of 2 assets checked').count()).toBe(1)
    await context.close()
  })
})
