import type { Browser } from 'playwright-core'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { inject } from 'vitest'
import { ApiClient, linkIn, signUpOwner } from '../support/api'
import { expectAccessible, launchBrowser, newSession, signInWithForm } from '../support/browser'
import { resetDatabase, testDb } from '../support/db'

let browser: Browser
let slug: string
const ownerEmail = 'ida@browser-notices.test'
const password = 'notices browser password'

async function mailFor(to: string): Promise<Array<{ subject: string; text: string }>> {
  return (await fetch(`${inject('mailCatcherUrl')}/messages?to=${encodeURIComponent(to)}`)).json()
}

beforeAll(async () => {
  await resetDatabase()
  const { client: owner, slug: s } = await signUpOwner('Ida Owner', ownerEmail, 'Ida Grid', password)
  slug = s
  // A calibration falling due gives the owner a notice and an e-mail when the daily jobs run.
  await owner.post(`/api/orgs/${slug}/instruments`, { make: 'Halden', model: 'T8', serial: 'BN-1', bandFromUm: 8, bandToUm: 14, calibrationDue: '2027-05-10' })
  const run = await new ApiClient().post('/api/dev/notices/run', { now: '2027-05-01T12:00:00Z' })
  expect(run.status, JSON.stringify(run.body)).toBe(200)
  browser = await launchBrowser()
}, 60_000)
afterAll(async () => {
  await browser?.close()
})

describe('notices in the app', () => {
  it('shows the unread count in the header, the list, and marks a notice read', async () => {
    const { context, page } = await newSession(browser)
    await signInWithForm(page, ownerEmail, password)
    const bell = page.getByRole('link', { name: 'Notices, 1 unread' })
    await bell.waitFor()
    await bell.click()
    await page.getByRole('heading', { level: 1, name: 'Notices' }).waitFor()
    await expect.poll(() => page.getByRole('heading', { level: 3, name: 'Calibration of Halden T8 (serial BN-1) is due in 9 days' }).count()).toBe(1)
    await expectAccessible(page, 'notices page')
    await page.getByRole('button', { name: /Mark read/ }).click()
    await page.getByRole('link', { name: 'Notices, none unread' }).waitFor()

    // E-mail choices: untick one kind and save.
    await page.getByLabel('Instrument calibrations due within 30 days').uncheck()
    await page.getByRole('button', { name: 'Save e-mail choices' }).click()
    await page.getByText('Saved.').waitFor()
    await expect.poll(async () => (await testDb().selectFrom('notice_preferences').select('kind').where('by_email', '=', false).execute()).map((p) => p.kind))
      .toEqual(['calibration_due'])

    await page.goto(`/orgs/${slug}/outbox`)
    await page.getByRole('heading', { level: 1, name: 'Outbox' }).waitFor()
    await expect.poll(() => page.getByRole('cell', { name: ownerEmail }).count()).toBe(1)
    await expectAccessible(page, 'outbox page')
    await context.close()
  }, 180_000)

  it('turns an e-mail off from its link without signing in, and back on', async () => {
    await testDb().deleteFrom('notice_preferences').execute()
    const [mail] = await mailFor(ownerEmail).then((m) => m.filter((x) => x.subject.startsWith('Calibration')))
    const link = linkIn(mail!.text, '/notices/unsubscribe')
    const { context, page } = await newSession(browser, { phone: true })
    await page.goto(link)
    await page.getByText(/You will no longer get e-mails for “Instrument calibrations due within 30 days” from Ida Grid/).waitFor()
    await expectAccessible(page, 'one-click page')
    expect((await testDb().selectFrom('notice_preferences').select('by_email').executeTakeFirstOrThrow()).by_email).toBe(false)
    await page.getByRole('button', { name: 'Turn these e-mails back on' }).click()
    await page.getByText(/again\./).waitFor()
    expect((await testDb().selectFrom('notice_preferences').select('by_email').executeTakeFirstOrThrow()).by_email).toBe(true)
    await context.close()
  }, 180_000)
})
