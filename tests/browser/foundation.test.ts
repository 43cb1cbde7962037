import type { Browser, Page } from 'playwright-core'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { linkIn, mailFor } from '../support/api'
import { expectAccessible, launchBrowser, newSession, signInWithForm } from '../support/browser'
import { resetDatabase } from '../support/db'

let browser: Browser

beforeAll(async () => {
  await resetDatabase()
  browser = await launchBrowser()
})
afterAll(async () => {
  await browser?.close()
})

async function signIn(page: Page, email: string, password: string) {
  await signInWithForm(page, email, password, { landing: false })
}

async function signOut(page: Page) {
  await page.getByRole('button', { name: 'Your account menu' }).click()
  await page.getByRole('button', { name: 'Sign out' }).click()
  await page.waitForURL(/sign-in|\/$/)
}

describe('the platform in a browser', () => {
  it('signs up, lands in the new organisation, passes the accessibility check', async () => {
    const { context, page } = await newSession(browser)
    await page.goto('/sign-up')
    await expectAccessible(page, 'sign-up')
    await page.getByLabel('Your name').fill('Nora Vance')
    await page.getByLabel('E-mail').fill('nora@browser.test')
    await page.getByLabel('Password', { exact: true }).fill('nora long password')
    await page.getByLabel('Organisation name').fill('Vance Grid')
    await page.getByRole('button', { name: 'Create account' }).click()
    await page.waitForURL('**/orgs/vance-grid')
    await page.getByRole('main').getByText('Vance Grid').first().waitFor()
    await expectAccessible(page, 'organisation overview')
    await page.goto('/orgs/vance-grid/members')
    await page.getByRole('heading', { level: 1, name: /Members/ }).waitFor()
    await expectAccessible(page, 'members')
    await page.goto('/account')
    await page.getByRole('heading', { level: 1 }).waitFor()
    await expectAccessible(page, 'account')
    await context.close()
  })

  it('shows the same message for a wrong password, and signs in and out', async () => {
    const { context, page } = await newSession(browser)
    await signIn(page, 'nora@browser.test', 'not the password')
    await page.getByText('E-mail or password is incorrect.').waitFor()
    await expectAccessible(page, 'sign-in with an error')
    await signIn(page, 'nora@browser.test', 'nora long password')
    await page.waitForURL('**/orgs/vance-grid')
    await signOut(page)
    await page.goto('/orgs/vance-grid')
    await page.waitForURL(/sign-in/)
    await context.close()
  })

  it('invites a second person by e-mail, who joins with the invited role', async () => {
    const owner = await newSession(browser)
    await signIn(owner.page, 'nora@browser.test', 'nora long password')
    await owner.page.waitForURL('**/orgs/vance-grid')
    await owner.page.goto('/orgs/vance-grid/members')
    await owner.page.getByLabel('E-mail address').fill('omar@browser.test')
    await owner.page.getByLabel('Role', { exact: true }).selectOption('thermographer')
    await owner.page.getByRole('button', { name: 'Send invitation' }).click()
    await owner.page.getByText('omar@browser.test').first().waitFor()

    // The invited person follows the e-mailed link, as shown on the development mailbox page.
    await owner.page.goto('/dev/mail')
    await owner.page.getByText(/invited you to Vance Grid/).first().waitFor()
    const [mail] = await mailFor('omar@browser.test')
    const link = linkIn(mail!.text, '/invitations/')
    const guest = await newSession(browser, { phone: true })
    await guest.page.goto(link)
    await guest.page.getByRole('heading', { name: 'Join Vance Grid' }).waitFor()
    await expectAccessible(guest.page, 'invitation (phone)')
    await guest.page.getByLabel('Your name').fill('Omar Quist')
    await guest.page.getByLabel('Password', { exact: true }).fill('omar long password')
    await guest.page.getByRole('button', { name: 'Create account and join' }).click()
    await guest.page.waitForURL('**/orgs/vance-grid')
    const me = await guest.page.evaluate(() => fetch('/api/orgs/vance-grid').then((r) => r.json()))
    expect(me.myRole).toBe('thermographer')
    await owner.page.goto('/orgs/vance-grid/members')
    await owner.page.getByRole('button', { name: 'Remove Omar Quist' }).waitFor()
    await owner.context.close()
    await guest.context.close()
  })

  it('resets a forgotten password through the e-mailed link', async () => {
    const { context, page } = await newSession(browser)
    await page.goto('/forgot-password')
    await page.getByLabel('E-mail').fill('nora@browser.test')
    await page.getByRole('button', { name: 'Send the reset link' }).click()
    await page.getByText(/reset link is on its way/).waitFor()
    const [mail] = await mailFor('nora@browser.test')
    await page.goto(linkIn(mail!.text, '/reset-password'))
    await page.getByLabel('New password', { exact: true }).fill('nora newer password')
    await page.getByLabel('New password again').fill('nora newer password')
    await page.getByRole('button', { name: 'Save the new password' }).click()
    await page.getByText(/password has been changed/i).waitFor()
    await signIn(page, 'nora@browser.test', 'nora newer password')
    await page.waitForURL('**/orgs/vance-grid')
    await context.close()
  })

  it('switches between two organisations, with the organisation in the URL', async () => {
    const { context, page } = await newSession(browser)
    await signIn(page, 'nora@browser.test', 'nora newer password')
    await page.waitForURL('**/orgs/vance-grid')
    await page.goto('/orgs')
    await page.getByLabel('Organisation name').fill('Vance Contracting')
    await page.getByRole('button', { name: /Start/ }).click()
    await page.waitForURL('**/orgs/vance-contracting')
    await page.waitForLoadState('networkidle')
    const choice = page.getByRole('banner').getByRole('link', { name: /Vance Grid/ })
    // The layout re-renders for the new organisation; open the switcher once it stays open.
    for (let attempt = 0; attempt < 5 && !(await choice.isVisible()); attempt++) {
      await page.getByRole('button', { name: /Organisation:/ }).click()
      await choice.waitFor({ state: 'visible', timeout: 2_000 }).catch(() => undefined)
    }
    await choice.click()
    await page.waitForURL('**/orgs/vance-grid')
    await page.getByRole('main').getByText('Vance Grid').first().waitFor()
    await context.close()
  })
})

describe('changing one\'s own password in a browser', () => {
  it('keeps this session (signed in again with the new password) while older sessions end', async () => {
    const mine = await newSession(browser)
    const other = await newSession(browser)
    for (const s of [mine, other]) await signIn(s.page, 'nora@browser.test', 'nora newer password')
    await mine.page.waitForURL('**/orgs/**')
    await other.page.waitForURL('**/orgs/**')
    await new Promise((r) => setTimeout(r, 1100))
    await mine.page.goto('/account')
    await mine.page.getByLabel('Current password').fill('nora newer password')
    await mine.page.getByLabel('New password', { exact: true }).fill('nora newest password')
    await mine.page.getByLabel('New password again').fill('nora newest password')
    await mine.page.getByRole('button', { name: 'Change password' }).click()
    await mine.page.getByText('Your password has been changed.').waitFor()
    const status = (p: Page) => p.evaluate(() => fetch('/api/account/me').then((r) => r.status))
    expect(await status(mine.page)).toBe(200)
    expect(await status(other.page)).toBe(401)
    await mine.context.close()
    await other.context.close()
  })
})
