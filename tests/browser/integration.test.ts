import type { Browser, Page } from 'playwright-core'
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest'
import { expectAccessible, launchBrowser, newSession, signInWithForm } from '../support/browser'
import { resetDatabase } from '../support/db'
import { makeOrg, surveyWith, withToken, type Org } from '../support/integration-fixtures'

let browser: Browser
let org: Org
const password = 'correct horse battery' // signUpOwner's default

beforeAll(async () => {
  await resetDatabase()
  org = await makeOrg('browse', ['T1'])
  for (const [date, hot] of [['2026-01-10', 42], ['2026-04-20', 44], ['2026-07-29', 47]] as const) {
    await surveyWith(org, date, [{ asset: 'T1', component: 'Line-side lug', phase: 'L1', apparentC: hot, referenceC: 40 }])
  }
  browser = await launchBrowser()
}, 120_000)
afterAll(async () => {
  await browser?.close()
})

async function signIn(page: Page) {
  await signInWithForm(page, 'browse-owner@integration.test', password)
}

describe('trends', () => {
  it('draws the chart of a component from the findings list link, with the projection in words', async () => {
    const { page } = await newSession(browser)
    await signIn(page)
    await page.goto(`/orgs/${org.slug}/findings`)
    await expect.poll(() => page.getByTestId('finding-trend-link').count()).toBe(3)
    await expect.poll(() => page.getByTestId('export-findings').getAttribute('href')).toBe(`/api/orgs/${org.slug}/findings/export`)
    await page.getByTestId('finding-trend-link').first().click()
    await page.waitForURL(/component=Line-side/)
    const trend = page.getByTestId('trend')
    await expect.poll(() => trend.count()).toBe(1)
    // Chart.js draws into the canvas once mounted: it gets a size and the summary names every reading.
    const canvas = page.locator('canvas[data-trend-chart]')
    await expect.poll(async () => (await canvas.boundingBox())?.height ?? 0).toBeGreaterThan(100)
    expect(await canvas.getAttribute('aria-label')).toContain('2026-07-29: 7.0 K')
    expect(await page.getByTestId('trend-projection').textContent()).toContain('around 2027-06-21')
    expect(await page.getByTestId('trend-quantity').textContent()).toMatch(/^Measured/)
    await expectAccessible(page, 'asset trends')
  })
})

describe('API tokens page', () => {
  it('creates a token shown once, which then reads the API; revokes it', async () => {
    const { page } = await newSession(browser)
    await signIn(page)
    await page.goto(`/orgs/${org.slug}/api-tokens`)
    await expectAccessible(page, 'API tokens, empty')
    await page.getByLabel('Token name').fill('Maintenance system')
    await page.getByLabel('Scope').selectOption('read_write')
    await page.getByRole('button', { name: 'Create token' }).click()
    const secret = page.getByTestId('token-secret-value')
    await expect.poll(() => secret.count()).toBe(1)
    const value = await secret.inputValue()
    expect(value).toMatch(/^gbt_/)
    await expectAccessible(page, 'API tokens, new secret')
    const res = await withToken(inject('baseUrl'), value, 'GET', `/api/orgs/${org.slug}/findings`)
    expect(res.status).toBe(200)
    // Shown once: after reloading, only the hint is left.
    await page.reload()
    await expect.poll(() => page.getByTestId('token-row').count()).toBe(1)
    expect(await page.getByTestId('token-secret').count()).toBe(0)
    expect(await page.content()).not.toContain(value.slice(8))
    await page.getByRole('button', { name: 'Show requests' }).click()
    await expect.poll(() => page.getByText(`GET /api/orgs/${org.slug}/findings`).count()).toBe(1)
    await page.getByRole('button', { name: 'Revoke' }).click()
    await page.getByRole('button', { name: 'Revoke token' }).click()
    await expect.poll(() => page.getByTestId('token-row').textContent()).toContain('Revoked')
    await expectAccessible(page, 'API tokens, revoked')
    expect((await withToken(inject('baseUrl'), value, 'GET', `/api/orgs/${org.slug}/findings`)).status).toBe(401)
  })
})

describe('API documentation', () => {
  it('renders the OpenAPI document with curl examples', async () => {
    const { page } = await newSession(browser)
    await page.goto('/docs/api')
    await expect.poll(() => page.getByTestId('api-operation').count()).toBeGreaterThanOrEqual(8)
    expect(await page.getByText("-H \"Authorization: Bearer $GREYBODY_TOKEN\"").count()).toBeGreaterThan(0)
    await expectAccessible(page, 'API documentation')
  })
})
