import type { Browser } from 'playwright-core'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { ApiClient, linkIn, mailFor, signUpOwner } from '../support/api'
import { expectAccessible, launchBrowser, newSession, signInWithForm } from '../support/browser'
import { resetDatabase } from '../support/db'
import { reviewedSurvey } from '../support/reports'

let browser: Browser
let slug: string
let surveyId: string
const ownerEmail = 'rae@browser-reports.test'
const ownerPassword = 'correct horse battery'

beforeAll(async () => {
  await resetDatabase()
  const { client: owner, slug: s } = await signUpOwner('Rae Owner', ownerEmail, 'Rae Networks', ownerPassword)
  slug = s
  const email = 'tom@browser-reports.test'
  await owner.post(`/api/orgs/${slug}/invitations`, { email, role: 'thermographer' })
  const [mail] = await mailFor(email)
  const token = linkIn(mail!.text, '/invitations/').split('/invitations/')[1]!
  const thermo = new ApiClient()
  const joined = await thermo.post('/api/account/sign-up', { name: 'Tom Thermographer', email, password: 'thermo browser password', invitationToken: token })
  await thermo.signIn(email, 'thermo browser password')
  const site = await owner.post(`/api/orgs/${slug}/sites`, { code: 'ASH', name: 'Ashby', kind: 'substation', latitude: 52.1, longitude: -1.2 })
  const asset = await owner.post(`/api/orgs/${slug}/assets`, { siteId: site.body.id, label: 'CB1', assetClass: 'breaker' })
  const inst = await owner.post(`/api/orgs/${slug}/instruments`, { make: 'Halden', model: 'T8', serial: 'B-2', bandFromUm: 8, bandToUm: 14, calibrationDue: '2027-05-01' })
  surveyId = await reviewedSurvey(owner, thermo, slug, { thermographerId: joined.body.user.id, instrumentId: inst.body.id, siteIds: [site.body.id] }, async (id) => {
    await thermo.post(`/api/orgs/${slug}/surveys/${id}/findings`, {
      assetId: asset.body.id, component: 'Line-side connector', apparentC: 60, referenceC: 30, ambientC: 15, emissivity: 0.9, reflectedC: 15, reflectedMethod: 'reflector', probableCause: 'loose_connection',
    })
  })
  browser = await launchBrowser()
}, 120_000)
afterAll(async () => {
  await browser?.close()
})

describe('the survey report on the review page', () => {
  it('shows progress while the report is made, then a link that downloads the PDF', { timeout: 180_000 }, async () => {
    const { context, page } = await newSession(browser)
    await signInWithForm(page, ownerEmail, ownerPassword)
    await page.goto(`/orgs/${slug}/surveys/${surveyId}/review`)
    // The button works once the page is hydrated (before that a press would be a plain form post).
    await page.waitForFunction(() => Boolean((document.querySelector('#__nuxt') as unknown as { __vue_app__?: unknown } | null)?.__vue_app__), undefined, { timeout: 30_000 })
    const panel = page.getByRole('region', { name: 'Survey report (PDF)' })
    await expect.poll(() => panel.getByText('No report made for this survey yet.').count()).toBe(1)
    await expectAccessible(page, 'review page with the report panel')
    // The bar may come and go quickly: note every progress bar the page ever shows.
    await page.evaluate(() => {
      const w = window as unknown as { sawProgress: boolean }
      w.sawProgress = false
      new MutationObserver(() => {
        if (document.querySelector('[role="progressbar"]')) w.sawProgress = true
      }).observe(document.body, { childList: true, subtree: true })
    })
    await panel.getByRole('button', { name: 'Make PDF report' }).click()
    await expect.poll(() => page.evaluate(() => (window as unknown as { sawProgress: boolean }).sawProgress)).toBe(true)
    const link = panel.getByRole('link', { name: /Download PDF/ })
    await expect.poll(() => link.count(), { timeout: 60_000 }).toBe(1)
    await expect.poll(() => panel.getByRole('progressbar').count()).toBe(0)
    await expect.poll(() => panel.textContent()).toMatch(/Ready · \d+ pages · \d+ kB/)
    await expectAccessible(page, 'review page with a ready report')
    const href = await link.getAttribute('href')
    expect(href).toMatch(new RegExp(`^/api/orgs/${slug}/reports/[0-9a-f-]{36}/download$`))
    // As a browser follows the link: redirected to object storage, which answers with the PDF as an attachment.
    const res = await page.request.get(href!, { headers: { accept: 'text/html' } })
    expect(res.status()).toBe(200)
    expect(res.headers()['content-type']).toBe('application/pdf')
    expect(res.headers()['content-disposition']).toMatch(/^attachment; filename="greybody-/)
    expect((await res.body()).subarray(0, 5).toString()).toBe('%PDF-')
    await context.close()
  })
})
