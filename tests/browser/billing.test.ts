import type { Browser, Page } from 'playwright-core'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { signUpOwner } from '../support/api'
import { expectAccessible, launchBrowser, newSession, signInWithForm } from '../support/browser'
import { resetDatabase, testDb } from '../support/db'
import { stripeFake } from '../support/stripe'

let browser: Browser
const fake = stripeFake()
// Payments go through the app, the provider fake and back; give them more than vitest's default second.
const poll = <T>(fn: () => Promise<T> | T) => expect.poll(fn, { timeout: 15_000 })

beforeAll(async () => {
  await resetDatabase()
  await fake.control('reset')
  browser = await launchBrowser()
})
afterAll(async () => {
  await browser?.close()
})

async function signIn(page: Page, email: string, password: string) {
  await signInWithForm(page, email, password)
}

describe('billing in the browser', () => {
  // One owner's session carries through the subscribe → seats → cancel steps.
  let session: Awaited<ReturnType<typeof newSession>>
  let slug: string
  afterAll(async () => {
    await session?.context.close()
  })

  it('subscribes through the Checkout page and comes back to the plan active with its invoice listed', async () => {
    const owner = await signUpOwner('Ada Billing', 'ada@browser-billing.test', 'Ada Transmission')
    slug = owner.slug
    session = await newSession(browser)
    const { page } = session
    await signIn(page, 'ada@browser-billing.test', owner.password)
    await page.goto(`/orgs/${slug}/billing`)
    await poll(() => page.getByTestId('billing-plan').textContent()).toBe('Trial')
    await poll(() => page.getByRole('link', { name: 'Billing' }).first().isVisible()).toBe(true)
    await expectAccessible(page, 'billing page on the trial')

    // Choose Programme, monthly, 2 seats: 2 × 39.00 = 78.00 USD per month (per-seat price × seats).
    await page.getByRole('radio', { name: /^Programme/ }).check()
    await page.getByRole('radio', { name: /^Monthly/ }).check()
    await page.getByLabel('Seats', { exact: true }).fill('2')
    await poll(() => page.getByTestId('plan-total').textContent()).toMatch(/78\.00 USD\s+per month/)
    await page.getByRole('button', { name: 'Continue to payment' }).click()

    // The payment provider's page (the local fake), then back to the billing page.
    await page.waitForURL(new RegExp(`^${fake.url}/checkout/cs_`))
    expect(await page.getByTestId('checkout-total').textContent()).toBe('78.00 USD')
    await page.getByRole('button', { name: 'Pay' }).click()
    await page.waitForURL(new RegExp(`/orgs/${slug}/billing\\?checkout=done&session=cs_`))
    await poll(() => page.getByText('Subscription active').isVisible()).toBe(true)
    expect(await page.getByTestId('billing-plan').textContent()).toBe('Programme')
    expect(await page.getByTestId('billing-status').textContent()).toBe('Active')
    expect((await page.getByTestId('billing-seats').textContent())?.replace(/\s+/g, ' ')).toBe('1 / 2')
    const firstRow = page.getByTestId('invoice-table').locator('tbody tr').first()
    expect(await firstRow.textContent()).toMatch(/GBF-\d{5}.*New subscription.*78\.00 USD.*Paid/)
    await expectAccessible(page, 'billing page after checkout')
  })

  it('offers to add a seat when an invitation goes beyond the seats, then sends it', async () => {
    const { page } = session
    // Two people with editing roles fill the two seats; the next invitation offers to add one.
    await page.goto(`/orgs/${slug}/members`)
    const invite = async (email: string, role: string) => {
      await page.getByLabel('E-mail address').fill(email)
      await page.getByLabel('Role', { exact: true }).selectOption({ label: role })
      await page.getByRole('button', { name: 'Send invitation' }).click()
    }
    await invite('bo@browser-billing.test', 'Thermographer')
    await poll(() => page.getByText('Invitation sent to bo@browser-billing.test').isVisible()).toBe(true)
    await invite('cy@browser-billing.test', 'Crew')
    const prompt = page.getByTestId('seat-prompt')
    await poll(() => prompt.getByText('Add 1 seat to Programme?').isVisible()).toBe(true)
    await expectAccessible(page, 'members page with the seat prompt')
    await prompt.getByRole('button', { name: 'Add 1 seat and try again' }).click()
    await poll(() => page.getByText('Invitation sent to cy@browser-billing.test').isVisible()).toBe(true)

    await page.goto(`/orgs/${slug}/billing`)
    await poll(async () => (await page.getByTestId('billing-seats').textContent())?.replace(/\s+/g, ' ')).toBe('3 / 3')
    const rows = page.getByTestId('invoice-table').locator('tbody tr')
    expect(await rows.count()).toBe(2)
    expect(await rows.first().textContent()).toMatch(/Seat or plan change.*USD.*Paid/)
  })

  it('cancels at the end of the period', async () => {
    const { page } = session
    await page.getByRole('button', { name: 'Cancel subscription' }).click()
    await page.getByRole('button', { name: 'Cancel at period end' }).click()
    await poll(() => page.getByText('Cancellation requested').isVisible()).toBe(true)
    expect(await page.getByTestId('billing-status').textContent()).toBe('Ends at period end')
    expect(await page.getByTestId('billing-banner').count()).toBe(0)
    await expectAccessible(page, 'billing page after cancelling')
  })

  it('shows the lapse banner on every organisation page, and read-only once grace is over', async () => {
    const { slug, password } = await signUpOwner('Eli Lapse', 'eli@browser-billing.test', 'Eli Feeders')
    const org = await testDb().selectFrom('organisations').select('id').where('slug', '=', slug).executeTakeFirstOrThrow()
    await testDb().updateTable('organisation_billing').set({ trial_ends_at: new Date(Date.now() - 2 * 86_400_000) }).where('organisation_id', '=', org.id).execute()
    const { context, page } = await newSession(browser)
    try {
      await signIn(page, 'eli@browser-billing.test', password)
      await page.goto(`/orgs/${slug}/members`)
      const banner = page.getByTestId('billing-banner')
      await poll(() => banner.textContent()).toMatch(/The trial has ended.*Editing stays open until/)
      await expectAccessible(page, 'members page with the grace banner')

      await testDb().updateTable('organisation_billing').set({ trial_ends_at: new Date(Date.now() - 20 * 86_400_000) }).where('organisation_id', '=', org.id).execute()
      await page.goto(`/orgs/${slug}/settings`)
      await poll(() => banner.textContent()).toMatch(/Read-only.*can still be viewed and exported/)
      await banner.getByRole('link', { name: 'Restore editing' }).click()
      await page.waitForURL(new RegExp(`/orgs/${slug}/billing$`))
      expect(await page.getByTestId('billing-status').textContent()).toBe('Read-only')
      await expectAccessible(page, 'billing page while read-only')
    } finally {
      await context.close()
    }
  })
})
