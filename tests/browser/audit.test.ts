import type { Browser } from 'playwright-core'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { ApiClient, joinByInvitation, signUpOwner } from '../support/api'
import { expectAccessible, launchBrowser, newSession, signInWithForm } from '../support/browser'
import { resetDatabase } from '../support/db'

let browser: Browser
let slug: string
const PASSWORD = 'audit browser pass'

beforeAll(async () => {
  await resetDatabase()
  const o = await signUpOwner('Orla Owner', 'orla@audit-browser.test', 'Orla Power', PASSWORD)
  slug = o.slug
  const member = await joinByInvitation(o.client, slug, 'pip@audit-browser.test', 'viewer', 'Pip Viewer', PASSWORD)
  expect((await o.client.patch(`/api/orgs/${slug}/members/${member.id}`, { role: 'crew' })).status).toBe(200)
  // One refused sign-in against Pip.
  await new ApiClient().signIn('pip@audit-browser.test', 'wrong password here')
  browser = await launchBrowser()
}, 120_000)
afterAll(async () => {
  await browser?.close()
})

describe('audit log page', () => {
  it('lists the entries, filters them by kind and person, and is linked in the owner’s navigation', async () => {
    const { page } = await newSession(browser)
    await signInWithForm(page, 'orla@audit-browser.test', PASSWORD)
    await page.getByRole('link', { name: 'Audit log' }).first().click()
    await page.waitForURL(new RegExp(`/orgs/${slug}/audit$`))
    const rows = page.getByTestId('audit-row')
    await expect.poll(() => rows.count()).toBeGreaterThan(4)
    await expect.poll(() => page.getByText('Changed Pip Viewer <pip@audit-browser.test> from viewer to crew.').count()).toBe(1)

    await page.getByLabel('What').selectOption('member.role_changed')
    await expect.poll(() => rows.count()).toBe(1)
    await page.getByLabel('What').selectOption('sign_in')
    // Orla's sign-ups and this sign-in, Pip's sign-in and the refused one: every row is a sign-in.
    await expect.poll(async () => (await rows.allTextContents()).every((t) => /Signed in|Sign-in refused/.test(t))).toBe(true)
    await page.getByLabel('Person').selectOption({ label: 'Pip Viewer (pip@audit-browser.test)' })
    await expect.poll(() => rows.count()).toBe(2)
    await expect.poll(() => page.getByText('A sign-in as pip@audit-browser.test was refused.').count()).toBe(1)
    await page.getByLabel('From').fill('2099-01-01')
    await expect.poll(() => page.getByText('No entries match these filters').count()).toBe(1)
    await page.getByRole('button', { name: 'Clear filters' }).click()
    await expect.poll(() => rows.count()).toBeGreaterThan(4)
    await expectAccessible(page, 'audit log')
  })

  it('shows a person their own sign-ins on the account page, and no audit link to a non-owner', async () => {
    const { page } = await newSession(browser)
    await signInWithForm(page, 'pip@audit-browser.test', PASSWORD)
    expect(await page.getByRole('link', { name: 'Audit log' }).count()).toBe(0)
    await page.goto('/account')
    const events = page.getByTestId('account-event')
    await expect.poll(() => events.count()).toBe(3)
    expect(await events.first().textContent()).toContain('Signed in')
    await expect.poll(() => page.getByText('Sign-in refused (wrong password)').count()).toBe(1)
    await expectAccessible(page, 'account sign-ins')
  })
})
