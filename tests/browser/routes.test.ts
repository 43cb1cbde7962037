import type { Browser, Page } from 'playwright-core'
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest'
import { ApiClient, linkIn, mailFor, signUpOwner } from '../support/api'
import { expectAccessible, launchBrowser, newSession, signInWithForm } from '../support/browser'
import { resetDatabase } from '../support/db'
import { insertAssets, insertSites, orgIdOf } from '../support/programme-fixtures'
import { routeEstimate, shortestOrder } from '../../shared/route-plan'

// Six substations around a depot, in an invented region; added to the route in a deliberately poor order.
const SITES = [
  { code: 'NTH', name: 'Northgate', lat: 52.62, lon: -1.9 },
  { code: 'EST', name: 'Eastmere', lat: 52.42, lon: -1.55 },
  { code: 'STH', name: 'Southwold Lane', lat: 52.2, lon: -1.92 },
  { code: 'WST', name: 'Westcombe', lat: 52.41, lon: -2.3 },
  { code: 'NEA', name: 'Nettle Acre', lat: 52.55, lon: -1.68 },
  { code: 'SWA', name: 'Swale Bridge', lat: 52.27, lon: -2.15 },
]
const ADDED = ['NTH', 'STH', 'NEA', 'WST', 'EST', 'SWA']
const BASE = { lat: 52.4, lon: -1.9 }

let browser: Browser
let slug: string
let owner: ApiClient
const password = 'manager browser password'

beforeAll(async () => {
  await resetDatabase()
  ;({ client: owner, slug } = await signUpOwner('Gil Owner', 'gil@browser-routes.test', 'Gil Distribution'))
  await owner.post(`/api/orgs/${slug}/invitations`, { email: 'mia@browser-routes.test', role: 'manager' })
  const [mail] = await mailFor('mia@browser-routes.test')
  const token = linkIn(mail!.text, '/invitations/').split('/invitations/')[1]!
  await new ApiClient().post('/api/account/sign-up', { name: 'Mia Manager', email: 'mia@browser-routes.test', password, invitationToken: token })
  const orgId = await orgIdOf(slug)
  const ids = await insertSites(orgId, SITES)
  await insertAssets(orgId, SITES.map((s) => ({ siteId: ids[s.code]!, label: `${s.code}-T1`, condition: 1 as const })))
  await owner.post(`/api/orgs/${slug}/instruments`, { make: 'Corvid Thermal', model: 'C-320', serial: 'OLD-9', bandFromUm: 3, bandToUm: 5, calibrationDue: '2020-01-31' })
  browser = await launchBrowser()
})
afterAll(async () => {
  await browser?.close()
})

async function signIn(page: Page) {
  await signInWithForm(page, 'mia@browser-routes.test', password)
}

function bruteForceShortestKm(stops: Array<{ lat: number; lon: number }>): number {
  let best = Infinity
  const permute = (rest: typeof stops, done: typeof stops) => {
    if (!rest.length) {
      best = Math.min(best, routeEstimate(BASE, done, { roadFactor: 1, averageSpeedKmh: 60 }).straightKm)
      return
    }
    rest.forEach((s, i) => permute([...rest.slice(0, i), ...rest.slice(i + 1)], [...done, s]))
  }
  permute(stops, [])
  return best
}

async function stopCodes(page: Page): Promise<string[]> {
  const names = await page.getByTestId('route-stops').locator('li .font-semibold').allTextContents()
  return names.map((n) => n.split(' · ')[0]!.trim())
}

describe('map and routes in the browser', () => {
  it('shows the sites on a map that needs no internet, and builds a route ordered for the shortest trip', async () => {
    const { context, page } = await newSession(browser)
    // Anything outside the app's own address is refused and noted: the map must not need it.
    const baseUrl = inject('baseUrl')
    const outside: string[] = []
    await context.route('**/*', (route) => {
      const url = route.request().url()
      if (url.startsWith(baseUrl) || url.startsWith('data:') || url.startsWith('blob:')) return route.continue()
      outside.push(url)
      return route.abort()
    })
    await signIn(page)

    await page.goto(`/orgs/${slug}/map`)
    await expect.poll(() => page.locator('path.map-site').count(), { timeout: 15_000 }).toBe(SITES.length)
    // The land outline ships with the app and is drawn on its own canvas pane.
    await expect.poll(() => page.locator('.map-sites').first().getAttribute('data-background'), { timeout: 15_000 }).toBe('land')
    expect(await page.locator('.leaflet-land-pane canvas').count()).toBeGreaterThan(0)
    await page.locator('path.map-site').first().click()
    await expect.poll(() => page.getByTestId('site-summary').locator('h2').textContent()).toMatch(/·/)
    expect(await page.getByTestId('site-summary').textContent()).toMatch(/Assets\s*1/)
    await expectAccessible(page, 'map')

    await page.goto(`/orgs/${slug}/routes`)
    await page.getByRole('link', { name: 'New route' }).first().click()
    await page.waitForURL(/\/routes\/new$/)
    await page.getByLabel('Route name').fill('Ring of six')
    await page.getByLabel('Base name').fill('Central depot')
    await page.getByLabel('Base latitude (°)').fill(String(BASE.lat))
    await page.getByLabel('Base longitude (°)').fill(String(BASE.lon))
    // The instrument past its calibration date is flagged where it is chosen.
    await page.getByLabel('Instrument').selectOption({ label: 'Corvid Thermal C-320 · OLD-9 · MWIR 3–5 µm — calibration overdue' })
    await expect.poll(() => page.locator('[data-calibration="overdue"]').count()).toBe(1)

    for (const code of ADDED) {
      const site = SITES.find((s) => s.code === code)!
      await page.getByRole('button', { name: `Add ${site.name}`, exact: true }).click()
    }
    await expect.poll(() => stopCodes(page)).toEqual(ADDED)
    const stops = ADDED.map((c) => SITES.find((s) => s.code === c)!)
    const travel = { roadFactor: 1.3, averageSpeedKmh: 60 }
    const readKm = async () => Number((await page.getByTestId('route-estimate-km').textContent())!.replace(/[^\d.]/g, ''))
    const before = routeEstimate(BASE, stops, travel)
    await expect.poll(readKm).toBeCloseTo(before.roadKm, 0)

    // By hand first: the second stop moves up.
    await page.getByRole('button', { name: 'Move Southwold Lane up' }).click()
    await expect.poll(() => stopCodes(page)).toEqual(['STH', 'NTH', 'NEA', 'WST', 'EST', 'SWA'])

    await page.getByRole('button', { name: 'Order for shortest trip' }).click()
    const expectedOrder = shortestOrder(BASE, stops).map((k) => stops[k]!.code)
    await expect.poll(() => stopCodes(page)).toEqual(expectedOrder)
    const after = routeEstimate(BASE, expectedOrder.map((c) => SITES.find((s) => s.code === c)!), travel)
    await expect.poll(readKm).toBeCloseTo(after.roadKm, 0)
    expect(after.roadKm).toBeLessThan(before.roadKm)
    // Independent check: no order of the six stops makes a shorter loop (brute force over all 720 orders).
    expect(after.straightKm).toBeCloseTo(bruteForceShortestKm(stops), 6)
    expect(await page.getByTestId('route-estimate-time').textContent()).toMatch(/\d+ (h \d{2} min|min)/)
    await expectAccessible(page, 'route editor')

    await page.getByRole('button', { name: 'Save route' }).click()
    await page.waitForURL(/\/routes\/[0-9a-f-]{36}\?saved=1$/)
    const id = page.url().match(/routes\/([0-9a-f-]{36})/)![1]!
    const manager = new ApiClient()
    await manager.signIn('mia@browser-routes.test', password)
    const saved = await manager.get(`/api/orgs/${slug}/routes/${id}`)
    expect(saved.body.stops.map((s: { code: string }) => s.code)).toEqual(expectedOrder)
    expect(saved.body.estimate.roadKm).toBeCloseTo(after.roadKm, 6)
    expect(saved.body.instrument.calibrationStatus).toBe('overdue')
    await expect.poll(() => page.locator('.map-route-number').count()).toBe(SITES.length)
    await expectAccessible(page, 'route detail')

    expect(outside).toEqual([])
    await context.close()
  })
})
