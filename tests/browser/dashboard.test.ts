import type { Browser, Page } from 'playwright-core'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { signUpOwner } from '../support/api'
import { expectAccessible, launchBrowser, newSession, signInWithForm } from '../support/browser'
import { resetDatabase } from '../support/db'
import { orgIdOf } from '../support/programme-fixtures'
import { PERIOD, seedDashboardScenario, type Scenario } from '../support/dashboard-scenario'
import { todayIn } from '../../shared/schedule'

// The dashboard page over the seeded scenario whose figures tests/e2e/dashboard.test.ts works out by hand.
let browser: Browser
let slug: string
let scenario: Scenario
const email = 'dina@browser-dashboard.test'
const password = 'dashboard browser password'

beforeAll(async () => {
  await resetDatabase()
  const owner = await signUpOwner('Dina Owner', email, 'Dina Networks', password)
  slug = owner.slug
  scenario = await seedDashboardScenario(await orgIdOf(slug), owner.userId, todayIn('UTC'))
  browser = await launchBrowser()
}, 120_000)
afterAll(async () => {
  await browser?.close()
})

async function signedIn(): Promise<Page> {
  const { page } = await newSession(browser)
  await signInWithForm(page, email, password)
  return page
}

const figure = (page: Page, id: string) => page.locator(`[data-figure="${id}"] [data-value]`)

describe('the programme dashboard', () => {
  it('shows the figures and their charts, and a filter in the URL changes them', async () => {
    const page = await signedIn()
    const errors: string[] = []
    page.on('pageerror', (e) => errors.push(e.message))
    await page.goto(`/orgs/${slug}/dashboard?from=${PERIOD.from}&to=${PERIOD.to}`)
    // Coverage 3 of 9 on time (worked out in tests/e2e/dashboard.test.ts).
    await expect.poll(() => figure(page, 'coverage').textContent(), { timeout: 15_000 }).toBe('33.3 %')
    expect(await figure(page, 'open-findings').textContent()).toBe('5')
    expect(await figure(page, 'verification').textContent()).toBe('80 %')
    // Chart.js draws on canvases: coverage per site, open findings by age, backlog by age.
    await expect.poll(() => page.locator('canvas[data-chart]').count(), { timeout: 15_000 }).toBe(3)
    // …and each one has been drawn on: painted pixels, not just an empty element.
    const painted = () => page.locator('canvas[data-chart]').evaluateAll((all) => all.map((c) => {
      const canvas = c as HTMLCanvasElement
      const px = canvas.getContext('2d')!.getImageData(0, 0, canvas.width, canvas.height).data
      let n = 0
      for (let i = 3; i < px.length; i += 4) if (px[i]! > 0) n++
      return n
    }))
    await expect.poll(async () => Math.min(...await painted()), { timeout: 15_000 }).toBeGreaterThan(1000)
    await expect.poll(() => page.getByRole('link', { name: 'Dashboard' }).count()).toBeGreaterThan(0)
    await expectAccessible(page, 'dashboard')
    expect(errors).toEqual([])

    // South Yard only: coverage 1 of 4.
    await page.locator('#dashboard-sites').selectOption(scenario.siteIds.S!)
    await page.waitForURL(new RegExp(`site=${scenario.siteIds.S}`))
    await expect.poll(() => figure(page, 'coverage').textContent(), { timeout: 15_000 }).toBe('25 %')
    expect(await figure(page, 'open-findings').textContent()).toBe('3')
    // A shorter period: October 2025, every site → 1 of 5 due on time.
    // One change at a time, as a person makes them: each filter lands in the URL before the next is set.
    await page.getByRole('button', { name: 'All sites' }).click()
    await page.waitForURL((url) => !url.searchParams.has('site'))
    await page.locator('#dashboard-from').fill('2025-10-01')
    await page.locator('#dashboard-from').dispatchEvent('change')
    await page.waitForURL(/from=2025-10-01/)
    await page.locator('#dashboard-to').fill('2025-10-31')
    await page.locator('#dashboard-to').dispatchEvent('change')
    await expect.poll(() => figure(page, 'coverage').textContent(), { timeout: 15_000 }).toBe('20 %')
    expect(page.url()).toContain('from=2025-10-01')
    // Reloading keeps the filters.
    await page.reload()
    await expect.poll(() => figure(page, 'coverage').textContent(), { timeout: 15_000 }).toBe('20 %')
  })

  it('leads from a figure to the list behind it', async () => {
    const page = await signedIn()
    await page.goto(`/orgs/${slug}/dashboard?from=${PERIOD.from}&to=${PERIOD.to}`)
    await expect.poll(() => figure(page, 'coverage').textContent(), { timeout: 15_000 }).toBe('33.3 %')
    await page.locator('[data-figure="coverage"]').getByRole('link').click()
    await page.waitForURL(/\/dashboard\/coverage\?/)
    await expect.poll(() => page.locator('tr[data-asset]').count(), { timeout: 15_000 }).toBe(9)
    expect(await page.locator('tr[data-asset="N3"] [data-status]').textContent()).toBe('Late')
    await expectAccessible(page, 'coverage list')

    await page.goto(`/orgs/${slug}/dashboard?from=${PERIOD.from}&to=${PERIOD.to}`)
    await page.locator('[data-section="open-findings"] tr[data-band="2"]').getByRole('link').click()
    await page.waitForURL(/\/findings\?/)
    expect(page.url()).toContain('band=2')
    expect(page.url()).toContain('open=true')
    await expect.poll(() => page.locator('[data-link-filters]').textContent(), { timeout: 15_000 }).toContain('open findings only')
  })
})
