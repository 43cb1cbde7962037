import type { Browser, Locator, Page } from 'playwright-core'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { ApiClient, linkIn, mailFor, signUpOwner } from '../support/api'
import { expectAccessible, launchBrowser, newSession, signInWithForm } from '../support/browser'
import { resetDatabase } from '../support/db'

let browser: Browser
let slug: string
let surveyId: string
let thermo: ApiClient
const email = 'gus@browser-grid.test'
const password = 'grid browser password'

// A 64 × 48 grid (°C): 20.0 everywhere, a hot block at columns 39–46, rows 9–16 (0-based 38–45, 8–15) rising to 95.5
// at column 43, row 12, and a reference block of 30.0 at columns 5–8, rows 31–34 (0-based 4–7, 30–33).
const W = 64
const H = 48
function gridCsv(): string {
  const rows: string[] = []
  for (let y = 0; y < H; y++) {
    const row: string[] = []
    for (let x = 0; x < W; x++) {
      let v = 20
      if (x >= 38 && x <= 45 && y >= 8 && y <= 15) v = 60
      if (x === 42 && y === 11) v = 95.5
      if (x >= 4 && x <= 7 && y >= 30 && y <= 33) v = 30
      row.push(v.toFixed(1))
    }
    rows.push(row.join(','))
  }
  return `${rows.join('\n')}\n`
}

beforeAll(async () => {
  await resetDatabase()
  const { client: owner, slug: s } = await signUpOwner('Gwen Owner', 'gwen@browser-grid.test', 'Gwen Networks')
  slug = s
  await owner.post(`/api/orgs/${slug}/invitations`, { email, role: 'thermographer' })
  const [mail] = await mailFor(email)
  const token = linkIn(mail!.text, '/invitations/').split('/invitations/')[1]!
  thermo = new ApiClient()
  const joined = await thermo.post('/api/account/sign-up', { name: 'Gus Thermographer', email, password, invitationToken: token })
  await thermo.signIn(email, password)
  const site = await owner.post(`/api/orgs/${slug}/sites`, { code: 'ELM', name: 'Elmbrook', kind: 'substation', latitude: 52.1, longitude: -1.2 })
  await owner.post(`/api/orgs/${slug}/assets`, { siteId: site.body.id, label: 'CB4', assetClass: 'breaker' })
  const inst = await owner.post(`/api/orgs/${slug}/instruments`, { make: 'Halden', model: 'T8', serial: 'G-1', bandFromUm: 8, bandToUm: 14 })
  const survey = await owner.post(`/api/orgs/${slug}/surveys`, { plannedFor: '2026-12-02', thermographerId: joined.body.user.id, instrumentId: inst.body.id, siteIds: [site.body.id] })
  surveyId = survey.body.id
  await thermo.post(`/api/orgs/${slug}/surveys/${surveyId}/start`, { version: survey.body.version })
  browser = await launchBrowser()
})
afterAll(async () => {
  await browser?.close()
})

/** Waits until Vue has mounted (a click before that reaches a server-rendered button with no handler). */
async function hydrated(page: Page) {
  await page.waitForFunction(() => Boolean((document.querySelector('#__nuxt') as unknown as { __vue_app__?: unknown } | null)?.__vue_app__), undefined, { timeout: 30_000 })
}

/** The page position of the centre of grid pixel (x, y), 0-based. */
async function pixel(surface: Locator, x: number, y: number): Promise<{ x: number; y: number }> {
  const b = (await surface.boundingBox())!
  return { x: b.x + ((x + 0.5) / W) * b.width, y: b.y + ((y + 0.5) / H) * b.height }
}

/** Moves the mouse over pixel (x, y), bringing the picture into view first (filling a field may scroll the page). */
async function hover(page: Page, surface: Locator, x: number, y: number) {
  await surface.scrollIntoViewIfNeeded()
  const p = await pixel(surface, x, y + 1 < H ? y + 1 : y - 1)
  await page.mouse.move(p.x, p.y)
  const q = await pixel(surface, x, y)
  await page.mouse.move(q.x, q.y)
}

async function dragBox(page: Page, surface: Locator, from: [number, number], to: [number, number]) {
  await surface.scrollIntoViewIfNeeded()
  const a = await pixel(surface, ...from)
  const b = await pixel(surface, ...to)
  await page.mouse.move(a.x, a.y)
  await page.mouse.down()
  await page.mouse.move((a.x + b.x) / 2, (a.y + b.y) / 2)
  await page.mouse.move(b.x, b.y)
  await page.mouse.up()
}

describe('a temperature grid in the finding form, on a phone', () => {
  it('attaches a CSV grid, reads it, marks hot spot and reference, and re-corrects with ε', async () => {
    const { context, page } = await newSession(browser, { phone: true })
    await signInWithForm(page, email, password)
    await page.goto(`/orgs/${slug}/surveys/${surveyId}`)
    await hydrated(page)
    const cb4 = page.locator('li[data-asset="CB4"]')
    await cb4.getByRole('button', { name: 'Finding' }).click()
    const form = page.getByRole('form', { name: 'Finding' })

    // A bad file first: the row and column are named before anything is sent.
    await form.getByLabel('CSV grid file').setInputFiles({ name: 'bad.csv', mimeType: 'text/csv', buffer: Buffer.from('20,21,22\n23,warm,25\n') })
    await form.getByRole('button', { name: 'Attach grid' }).click()
    await expect.poll(() => form.getByRole('alert').first().textContent()).toContain('Row 2, column 2: “warm” is not a number.')

    await form.getByLabel('CSV grid file').setInputFiles({ name: 'cb4.csv', mimeType: 'text/csv', buffer: Buffer.from(gridCsv()) })
    await form.getByRole('button', { name: 'Attach grid' }).click()
    const surface = form.getByTestId('grid-surface')
    await surface.waitFor()
    await expect.poll(() => form.getByText(/64 × 48 · from °C/).count()).toBe(1)
    // The picture starts corrected with the form's ε (0.95) and a reflected 20 °C.
    await expect.poll(() => form.getByTestId('grid-timing').textContent()).toContain('object temperatures at ε 0.95, reflected 20.0 °C')
    // The canvas holds the picture: the hottest pixel is drawn with inferno's brightest entry (#fcffa4), a background one with its darkest (#000004).
    const colours = await page.evaluate(() => {
      const c = document.querySelector('[data-testid="grid-canvas"]') as HTMLCanvasElement
      const ctx = c.getContext('2d')!
      return [Array.from(ctx.getImageData(42, 11, 1, 1).data), Array.from(ctx.getImageData(0, 0, 1, 1).data)]
    })
    expect(colours).toEqual([[252, 255, 164, 255], [0, 0, 4, 255]])

    // Hover read-out.
    const readout = form.getByTestId('grid-readout')
    await hover(page, surface, 42, 11)
    await expect.poll(() => readout.textContent()).toMatch(/Column 43, row 12: 9\d\.\d °C \(apparent 95\.5 °C\)/)

    // Keyboard: the arrow keys move the cursor one pixel.
    await surface.focus()
    await page.keyboard.press('ArrowRight')
    await expect.poll(() => readout.textContent()).toMatch(/Column 44, row 12: 6\d\.\d °C \(apparent 60\.0 °C\)/)

    // A box around the hot block: its statistics (8 × 8 + a ring of background = 10 × 10 pixels).
    await dragBox(page, surface, [37, 7], [46, 16])
    const stats = form.getByTestId('grid-stats')
    await expect.poll(() => stats.textContent()).toContain('Box of 100 pixels')
    // max 95.5 at column 43, row 12; min 20.0; mean = (95.5 + 63 × 60 + 36 × 20) / 100 = 45.955 → 46.0 (hand-computed)
    await expect.poll(() => stats.textContent()).toMatch(/at column 43, row 12 \(apparent 95\.5 °C\)/)
    expect(await stats.textContent()).toMatch(/Min[\d.]+ °C \(apparent 20\.0 °C\)/)
    expect(await stats.textContent()).toMatch(/Mean[\d.]+ °C \(apparent 46\.0 °C\)/)
    await form.getByRole('button', { name: 'Mark as hot spot' }).click()
    await expect.poll(() => form.getByLabel('Hot spot, apparent (°C)').inputValue()).toBe('95.5')
    await expect.poll(() => form.getByTestId('grid-filled').textContent()).toContain('the highest apparent value in the marked box')

    // An ellipse over the reference block: all 30.0, so its mean is 30.0.
    await form.getByText('Ellipse', { exact: true }).click()
    await dragBox(page, surface, [4, 30], [7, 33])
    // 4 × 4 pixels less the four corners (pixel centres outside the inscribed ellipse) = 12.
    await expect.poll(() => stats.textContent()).toContain('Ellipse of 12 pixels')
    await form.getByRole('button', { name: 'Mark as reference' }).click()
    await expect.poll(() => form.getByLabel('Reference, apparent (°C)').inputValue()).toBe('30.0')
    await expect.poll(() => form.getByTestId('grid-filled').textContent()).toContain('the mean apparent value of the')

    // ε changes every pixel: at ε 1 the picture is the apparent one; at ε 0.5 (reflected 20 °C) the hot pixel reads far hotter.
    await form.getByLabel('Reflected for the picture (°C)').fill('20')
    await form.getByLabel('ε for the picture').fill('1')
    await hover(page, surface, 42, 11)
    await expect.poll(() => readout.textContent()).toContain('Column 43, row 12: 95.5 °C (apparent 95.5 °C)')
    await expect.poll(() => form.getByTestId('grid-scale').textContent()).toContain('to 95.5 °C')
    await form.getByLabel('ε for the picture').fill('0.5')
    await expect.poll(() => form.getByTestId('grid-timing').textContent()).toMatch(/object temperatures at ε 0\.5, reflected 20\.0 °C\. Re-corrected 3,072 pixels in [\d.]+ ms/)
    await hover(page, surface, 42, 11)
    await expect.poll(() => readout.textContent()).not.toContain('95.5 °C (apparent')
    const corrected = await readout.textContent()
    const objectC = Number(/row 12: ([\d.]+) °C/.exec(corrected!)![1])
    expect(objectC).toBeGreaterThan(120)
    expect(corrected).toContain('(apparent 95.5 °C)')
    await expect.poll(() => form.getByTestId('grid-scale').textContent()).not.toContain('to 95.5 °C')
    await expectAccessible(page, 'finding form with a temperature grid')

    // Save: the rest of the reading, then the grid is linked to the new finding with its regions.
    await form.getByLabel('Component').fill('Line-side connector')
    await form.getByLabel('Emissivity ε').fill('0.9')
    await form.getByLabel('Reflected (°C)').fill('20')
    await form.getByLabel('Probable cause').selectOption('loose_connection')
    await form.getByRole('button', { name: 'Save finding' }).click()
    await expect.poll(async () => (await thermo.get(`/api/orgs/${slug}/surveys/${surveyId}`)).body.summary.finding).toBe(1)
    const survey = (await thermo.get(`/api/orgs/${slug}/surveys/${surveyId}`)).body
    const finding = survey.sites[0].assets[0].findings[0]
    expect(finding.inputs).toMatchObject({ apparentC: 95.5, referenceC: 30 })
    await context.close()
  }, 180_000)

  it('opens a local grid on the workbench without saving it', async () => {
    const { context, page } = await newSession(browser, { phone: true })
    await signInWithForm(page, email, password)
    await page.goto(`/orgs/${slug}/workbench`)
    await hydrated(page)
    const panel = page.getByRole('region', { name: 'Temperature grid' })
    await panel.getByLabel('CSV grid file').setInputFiles({ name: 'local.csv', mimeType: 'text/csv', buffer: Buffer.from(gridCsv().replaceAll(',', '\t')) })
    await expect.poll(() => panel.getByText(/local\.csv: 64 × 48 values \(tab-separated\)/).count()).toBe(1)
    const surface = panel.getByTestId('grid-surface')
    await hover(page, surface, 42, 11)
    await expect.poll(() => panel.getByTestId('grid-readout').textContent()).toContain('(apparent 95.5 °C)')
    await dragBox(page, surface, [37, 7], [46, 16])
    await expect.poll(() => panel.getByTestId('grid-stats').textContent()).toContain('Box of 100 pixels')
    // Nothing to fill on the workbench: no marking buttons.
    expect(await panel.getByRole('button', { name: 'Mark as hot spot' }).count()).toBe(0)
    await expectAccessible(page, 'workbench with a local grid')

    // A 640 × 480 grid: changing ε re-corrects all 307 200 pixels; the screen says how long that and the drawing took.
    const big = Array.from({ length: 480 }, (_, y) => Array.from({ length: 640 }, (_, x) => (20 + ((x * y) % 97) / 2).toFixed(2)).join(',')).join('\n')
    await panel.getByLabel('CSV grid file').setInputFiles({ name: 'vga.csv', mimeType: 'text/csv', buffer: Buffer.from(big) })
    await expect.poll(() => panel.getByText(/vga\.csv: 640 × 480 values/).count(), { timeout: 30_000 }).toBe(1)
    const timings: string[] = []
    for (const eps of ['0.9', '0.8', '0.7']) {
      await panel.getByLabel('ε for the picture').fill(eps)
      await expect.poll(() => panel.getByTestId('grid-timing').textContent()).toMatch(new RegExp(`at ε ${eps.replace('.', '\\.')},.*Re-corrected 307,200 pixels in [\\d.]+ ms, drawn in [\\d.]+ ms`))
      timings.push((await panel.getByTestId('grid-timing').textContent())!.replace(/^.*Re-corrected/, 'Re-corrected'))
    }
    console.log(`640 × 480 in Chromium (load average ${(await import('node:os')).loadavg()[0]!.toFixed(1)}):\n  ${timings.join('\n  ')}`)
    await context.close()
  }, 120_000)
})
