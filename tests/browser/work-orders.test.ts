import type { Browser, Page } from 'playwright-core'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { ApiClient, linkIn, mailFor, signUpOwner } from '../support/api'
import { expectAccessible, launchBrowser, newSession, signInWithForm } from '../support/browser'
import { resetDatabase } from '../support/db'

// The loop in the browser: a manager raises a work order from a finding, the crew works it on a phone up to
// "awaiting verification", and the thermographer's re-scan closes it.

let browser: Browser
let slug: string
let findingId: string
const password = 'work order browser password'
// The machine running the suite is shared and slow: pages get time to load before an expectation gives up.
const slow = { timeout: 20_000 }
const emails = { manager: 'mina@browser-wo.test', crew: 'cole@browser-wo.test', thermographer: 'tara@browser-wo.test' }

async function join(owner: ApiClient, role: keyof typeof emails, name: string) {
  await owner.post(`/api/orgs/${slug}/invitations`, { email: emails[role], role })
  const [mail] = await mailFor(emails[role])
  const token = linkIn(mail!.text, '/invitations/').split('/invitations/')[1]!
  const c = new ApiClient()
  const res = await c.post('/api/account/sign-up', { name, email: emails[role], password, invitationToken: token })
  await c.signIn(emails[role], password)
  return { client: c, id: res.body.user.id as string }
}

async function signIn(page: Page, email: string) {
  await signInWithForm(page, email, password)
}

beforeAll(async () => {
  await resetDatabase()
  const { client: owner, slug: s } = await signUpOwner('Oda Owner', 'oda@browser-wo.test', 'Oda Grid')
  slug = s
  await join(owner, 'manager', 'Mina Manager')
  await join(owner, 'crew', 'Cole Crew')
  const thermo = await join(owner, 'thermographer', 'Tara Thermographer')
  const site = await owner.post(`/api/orgs/${slug}/sites`, { code: 'ELM', name: 'Elm Cross', kind: 'substation', latitude: 52.2, longitude: -1.4 })
  const asset = await owner.post(`/api/orgs/${slug}/assets`, { siteId: site.body.id, label: 'CB7', assetClass: 'breaker' })
  const inst = await owner.post(`/api/orgs/${slug}/instruments`, { make: 'Halden', model: 'T8', serial: 'BWO-1', bandFromUm: 8, bandToUm: 14 })
  const survey = await owner.post(`/api/orgs/${slug}/surveys`, { plannedFor: '2026-12-02', thermographerId: thermo.id, instrumentId: inst.body.id, siteIds: [site.body.id] })
  await thermo.client.post(`/api/orgs/${slug}/surveys/${survey.body.id}/start`, { version: survey.body.version })
  // ε = 1, so 50 °C apparent over 20 °C ambient is a 30 K rise: band 2 of ANSI/NETA Table 100.18 (above 20 to 40 K over ambient).
  const f = await thermo.client.post(`/api/orgs/${slug}/surveys/${survey.body.id}/findings`, {
    assetId: asset.body.id, component: 'Line-side stab', apparentC: 50, ambientC: 20, emissivity: 1, reflectedC: 20, reflectedMethod: 'direct', probableCause: 'loose_connection',
  })
  findingId = f.body.id
  browser = await launchBrowser()
}, 120_000)
afterAll(async () => {
  await browser?.close()
})

describe('a work order from finding to verified repair', () => {
  let woPath: string

  it('the manager raises it from the finding, with the crew and instructions', async () => {
    const { context, page } = await newSession(browser)
    await signIn(page, emails.manager)
    await page.goto(`/orgs/${slug}/work-orders/new?finding=${findingId}`)
    const form = page.getByRole('form', { name: 'Raise a work order' })
    await expect.poll(() => form.getByRole('checkbox', { name: /CB7 · Line-side stab/ }).isChecked(), slow).toBe(true)
    await expect.poll(() => form.getByText(/band 2 — due in 30 days/).count(), slow).toBe(1)
    await form.getByLabel('Instructions for the crew').fill('Switch out under permit, then re-torque the stab.')
    await form.getByRole('checkbox', { name: /Cole Crew/ }).check()
    await expectAccessible(page, 'raise form')
    await form.getByRole('button', { name: 'Raise the work order' }).click()
    await page.waitForURL(/\/work-orders\/[0-9a-f-]{36}$/)
    woPath = new URL(page.url()).pathname
    await expect.poll(() => page.getByRole('heading', { level: 1 }).textContent(), slow).toContain('WO-1')
    await expect.poll(() => page.getByText('Switch out under permit, then re-torque the stab.').count(), slow).toBe(1)
    await expect.poll(() => page.getByTestId('timeline').textContent(), slow).toContain('Raised WO-1')
    await expectAccessible(page, 'work order page (manager)')
    await context.close()
  }, 150_000)

  it('the crew member works it on a phone up to awaiting verification', async () => {
    const { context, page } = await newSession(browser, { phone: true })
    await signIn(page, emails.crew)
    await page.goto(`/orgs/${slug}/work-orders/mine`)
    await expect.poll(() => page.getByRole('link', { name: /WO-1/ }).count(), slow).toBe(1)
    await expect.poll(() => page.getByRole('region', { name: 'Map of the sites of my work orders' }).count(), slow).toBe(1)
    await expectAccessible(page, 'my repairs (phone)')
    await page.getByRole('link', { name: /WO-1/ }).click()
    await page.waitForURL(new RegExp(`${woPath}$`))
    await page.getByRole('button', { name: 'Mark planned' }).click()
    await expect.poll(() => page.getByText('Now: Planned.').count(), slow).toBe(1)
    const start = page.getByRole('button', { name: 'Start the repair' })
    const box = await start.boundingBox()
    expect(box!.height).toBeGreaterThanOrEqual(44)
    await start.click()
    await expect.poll(() => page.getByText('Now: In repair.').count(), slow).toBe(1)
    const work = page.getByRole('form', { name: 'What was done' })
    await work.getByLabel('Cause found').fill('Stab bolt under-torqued')
    await work.getByLabel('Time spent (minutes)').fill('40')
    await work.getByRole('button', { name: 'Save what was done' }).click()
    await expect.poll(() => work.getByText('Saved.').count(), slow).toBe(1)
    await page.getByLabel('Who re-scans it').selectOption({ label: 'Tara Thermographer' })
    await page.getByRole('button', { name: 'Repair done: ask for verification' }).click()
    await expect.poll(() => page.getByText('Waiting for a re-scan').count(), slow).toBe(1)
    await expect.poll(() => page.getByTestId('timeline').textContent(), slow).toContain('Verification requested for Line-side stab from Tara Thermographer')
    await expectAccessible(page, 'work order page (crew, phone)')
    await context.close()
  }, 150_000)

  it('the thermographer records a re-scan below the lowest band, which closes finding and work order', async () => {
    const { context, page } = await newSession(browser, { phone: true })
    await signIn(page, emails.thermographer)
    await page.goto(`/orgs/${slug}/verifications`)
    await page.getByRole('link', { name: 'Record the re-scan' }).click()
    const form = page.getByRole('form', { name: 'Re-scan' })
    // 20.5 − 20 = 0.5 K with ε = 1: below the 1 K where ANSI/NETA Table 100.18 starts ranking.
    await form.getByLabel('Hot spot, apparent (°C)').fill('20.5')
    await form.getByLabel('Ambient air (°C)').fill('20')
    await form.getByLabel('Emissivity ε').fill('1')
    await form.getByLabel('Reflected (°C)').fill('20')
    await expectAccessible(page, 're-scan form')
    await form.getByRole('button', { name: 'Save the re-scan' }).click()
    await expect.poll(() => page.getByText(/below the lowest band, so the finding is closed as verified/).count(), slow).toBe(1)
    await page.goto(woPath)
    await expect.poll(() => page.getByText('Closed, verified').count(), slow).toBeGreaterThan(0)
    await expect.poll(() => page.getByText('Verified repaired', { exact: true }).count(), slow).toBe(1)
    await expect.poll(() => page.getByTestId('timeline').textContent(), slow).toContain('Closed: every finding verified repaired.')
    await expectAccessible(page, 'closed work order')
    await context.close()
  }, 150_000)
})
