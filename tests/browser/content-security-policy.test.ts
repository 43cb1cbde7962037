import type { BrowserContext, Browser, Page } from 'playwright-core'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { launchBrowser, newSession, signInWithForm } from '../support/browser'
import { resetDatabase } from '../support/db'
import { testEnv } from '../support/env'
import { pngBytes } from '../support/images'
import { makeOrg, surveyWith, type Org } from '../support/integration-fixtures'

// The main screens run under the app's content security policy in Chromium: any report of a violation (the
// securitypolicyviolation event, or Chromium's console message) fails the test, and each screen must still work —
// the map draws, charts paint, images load from object storage and upload straight to it, a grid is drawn.

let browser: Browser
let org: Org
let surveyId: string
let findingId: string
const password = 'correct horse battery' // signUpOwner's default, used by makeOrg
const email = 'csp-owner@integration.test'
const slow = { timeout: 20_000 }

interface Violation { page: string; directive: string; blocked: string; sample: string; source: string }

beforeAll(async () => {
  await resetDatabase()
  org = await makeOrg('csp', ['T1', 'CB1'])
  const s = await surveyWith(org, '2026-05-04', [{ asset: 'T1', component: 'Line-side lug', phase: 'L1', apparentC: 60, referenceC: 40 }], { submit: false })
  surveyId = s.surveyId
  findingId = s.findingIds[0]!
  browser = await launchBrowser()
}, 120_000)
afterAll(async () => {
  await browser?.close()
})

/** A signed-in session whose every page reports CSP violations into `violations`. */
async function watchedSession(violations: Violation[]): Promise<{ context: BrowserContext; page: Page }> {
  const { context, page } = await newSession(browser)
  await context.exposeBinding('__reportCspViolation', (_source, v: Violation) => { violations.push(v) })
  await context.addInitScript(() => {
    document.addEventListener('securitypolicyviolation', (e) => {
      ;(window as unknown as { __reportCspViolation: (v: unknown) => void }).__reportCspViolation({
        page: location.pathname, directive: e.violatedDirective, blocked: e.blockedURI, sample: e.sample, source: `${e.sourceFile}:${e.lineNumber}`,
      })
    })
  })
  page.on('console', (m) => {
    if (/Content Security Policy|Refused to (load|execute|apply|evaluate|connect|frame)/i.test(m.text())) {
      violations.push({ page: new URL(page.url()).pathname, directive: 'console', blocked: '', sample: m.text(), source: '' })
    }
  })
  return { context, page }
}

/** Pixels with any paint on a canvas. */
const painted = (page: Page, selector: string) => page.locator(selector).evaluateAll((all) => all.map((c) => {
  const canvas = c as HTMLCanvasElement
  const px = canvas.getContext('2d')!.getImageData(0, 0, canvas.width, canvas.height).data
  let n = 0
  for (let i = 3; i < px.length; i += 4) if (px[i]! > 0) n++
  return n
}))

describe('the content security policy in the browser', () => {
  it('is enforced: an inline event handler and an image from an unlisted origin are refused and reported (the watch can fail)', async () => {
    const violations: Violation[] = []
    const { context, page } = await watchedSession(violations)
    await page.goto('/sign-in')
    const ran = await page.evaluate(() => {
      const b = document.createElement('button')
      b.setAttribute('onclick', 'window.__injected = true')
      document.body.appendChild(b)
      b.click()
      const img = document.createElement('img')
      img.src = 'http://198.51.100.7/pixel.png' // TEST-NET-2: never answers, and not in img-src
      document.body.appendChild(img)
      return (window as unknown as { __injected?: boolean }).__injected === true
    })
    expect(ran).toBe(false)
    await expect.poll(() => violations.map((v) => v.directive).sort(), slow).toEqual(expect.arrayContaining(['img-src', 'script-src-attr']))
    await context.close()
  })

  it('lets every main screen work with no violation', async () => {
    const violations: Violation[] = []
    const { context, page } = await watchedSession(violations)
    const storage = new URL(testEnv().NUXT_S3_ENDPOINT!).origin
    const storageRequests: string[] = []
    page.on('requestfinished', (r) => { if (new URL(r.url()).origin === storage) storageRequests.push(r.method()) })

    // Sign-in (a page with inline state and the auth client).
    await signInWithForm(page, email, password)

    // The field screen: an image goes straight to object storage (connect-src) and its thumbnail comes back (img-src).
    await page.goto(`/orgs/${org.slug}/surveys/${surveyId}`)
    const images = page.locator('li[data-asset="T1"]').getByTestId('finding-images')
    await images.getByRole('button', { name: 'Add images' }).click()
    await images.getByTestId('image-file').setInputFiles({ name: 'IR_0101.png', mimeType: 'image/png', buffer: await pngBytes(640, 480) })
    await expect.poll(() => images.locator('[data-upload-state]').first().getAttribute('data-upload-state'), slow).toBe('done')
    const thumb = images.getByTestId('finding-thumbnails').getByRole('img').first()
    await expect.poll(() => thumb.evaluate((img) => (img as HTMLImageElement).naturalWidth), slow).toBe(320)
    // The bytes went up to object storage (PUT) and the thumbnail came from there (the app redirects to a presigned URL).
    expect(storageRequests).toEqual(expect.arrayContaining(['PUT', 'GET']))

    // Submit the survey and raise a work order on the finding, as the owner would.
    const detail = await page.evaluate((url) => fetch(url).then((r) => r.json()), `/api/orgs/${org.slug}/surveys/${surveyId}`)
    const submitted = await page.evaluate(async ([url, version]) => {
      const r = await fetch(url as string, { method: 'POST', headers: { 'content-type': 'application/json' }, body: JSON.stringify({ version }) })
      return r.status
    }, [`/api/orgs/${org.slug}/surveys/${surveyId}/submit`, detail.version])
    expect(submitted).toBe(200)
    const wo = await page.evaluate(async ([url, id]) => {
      const r = await fetch(url as string, { method: 'POST', headers: { 'content-type': 'application/json' }, body: JSON.stringify({ findingIds: [id] }) })
      return { status: r.status, body: await r.json() }
    }, [`/api/orgs/${org.slug}/work-orders`, findingId])
    expect(wo.status, JSON.stringify(wo.body)).toBe(201)

    // The dashboard: Chart.js paints its canvases.
    await page.goto(`/orgs/${org.slug}/dashboard`)
    await expect.poll(() => page.locator('canvas[data-chart]').count(), slow).toBeGreaterThan(0)
    await expect.poll(async () => Math.min(...await painted(page, 'canvas[data-chart]')), slow).toBeGreaterThan(100)

    // The map: Leaflet draws the land outline and the site.
    await page.goto(`/orgs/${org.slug}/map`)
    await expect.poll(() => page.locator('.map-sites').getAttribute('data-background'), slow).toBe('land')
    await expect.poll(async () => Math.max(0, ...await painted(page, '.leaflet-land-pane canvas')), slow).toBeGreaterThan(1000)
    await expect.poll(() => page.locator('path.map-site').count(), slow).toBe(1)

    // Work orders: the list, and one order with its finding's image and its site map.
    await page.goto(`/orgs/${org.slug}/work-orders`)
    await expect.poll(() => page.getByText('Line-side lug').count(), slow).toBeGreaterThan(0)
    await page.goto(`/orgs/${org.slug}/work-orders/${wo.body.id}`)
    const woThumb = page.getByTestId('finding-thumbnails').getByRole('img').first()
    await expect.poll(() => woThumb.evaluate((img) => (img as HTMLImageElement).naturalWidth), slow).toBe(320)
    // Leaflet draws its site map there: the land outline and the order's one site as a marker.
    await expect.poll(() => page.locator('.wo-map.leaflet-container .leaflet-control-attribution').count(), slow).toBe(1)
    await expect.poll(() => page.locator('.wo-map path.leaflet-interactive').count(), slow).toBe(1)

    // The findings list.
    await page.goto(`/orgs/${org.slug}/findings`)
    await expect.poll(() => page.getByText('Line-side lug').count(), slow).toBeGreaterThan(0)

    // The workbench: the Planck chart and a temperature grid drawn on a canvas.
    await page.goto(`/orgs/${org.slug}/workbench`)
    const grid = Array.from({ length: 48 }, (_, y) => Array.from({ length: 64 }, (_, x) => (20 + ((x * y) % 40)).toFixed(1)).join(',')).join('\n')
    const panel = page.getByRole('region', { name: 'Temperature grid' })
    await panel.getByLabel('CSV grid file').setInputFiles({ name: 'local.csv', mimeType: 'text/csv', buffer: Buffer.from(grid) })
    await expect.poll(() => panel.getByText(/local\.csv: 64 × 48 values/).count(), slow).toBe(1)
    await expect.poll(async () => Math.min(...await painted(page, '[data-testid="grid-canvas"]')), slow).toBe(64 * 48)
    await expect.poll(async () => (await painted(page, 'canvas:not([data-testid="grid-canvas"])')).some((n) => n > 1000), slow).toBe(true)

    // The API documentation.
    await page.goto('/docs/api')
    await expect.poll(() => page.getByRole('heading', { name: 'API documentation' }).count(), slow).toBe(1)
    await expect.poll(() => page.getByText('/api/orgs/{org}/findings', { exact: false }).count(), slow).toBeGreaterThan(0)

    expect(violations).toEqual([])
    await context.close()
  }, 180_000)
})
