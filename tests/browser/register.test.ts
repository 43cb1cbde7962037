import type { Browser, Page } from 'playwright-core'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { ApiClient, linkIn, mailFor, signUpOwner } from '../support/api'
import { expectAccessible, launchBrowser, newSession, signInWithForm } from '../support/browser'
import { resetDatabase } from '../support/db'

let browser: Browser
let slug: string

beforeAll(async () => {
  await resetDatabase()
  browser = await launchBrowser()
  const { client: owner, slug: s } = await signUpOwner('Rhea Stone', 'rhea@register-browser.test', 'Stonegate Power')
  slug = s
  // The manager joins through an invitation, as people do.
  await owner.post(`/api/orgs/${slug}/invitations`, { email: 'milo@register-browser.test', role: 'manager' })
  const [mail] = await mailFor('milo@register-browser.test')
  const token = linkIn(mail!.text, '/invitations/').split('/invitations/')[1]!
  await new ApiClient().post('/api/account/sign-up', { name: 'Milo Hart', email: 'milo@register-browser.test', password: 'milo long password', invitationToken: token })
})
afterAll(async () => {
  await browser?.close()
})

async function signIn(page: Page, email: string, password: string) {
  await signInWithForm(page, email, password, { landing: false })
  await page.waitForURL((url) => !url.pathname.startsWith('/sign-in'))
}

const SITES_HEADER = 'code,name,kind,latitude,longitude,voltage_kv,access_notes,safety_notes,safety_flags'

describe('the asset register in a browser', () => {
  it('a manager adds a site and an asset, then imports a CSV: sees the bad row, fixes it and commits', async () => {
    const { context, page } = await newSession(browser)
    await signIn(page, 'milo@register-browser.test', 'milo long password')

    // Sites: the list, a refused form, then a site.
    await page.goto(`/orgs/${slug}/sites`)
    await page.getByRole('heading', { level: 1, name: 'Sites' }).waitFor()
    await page.getByRole('navigation', { name: 'Organisation' }).getByRole('link', { name: 'Assets' }).waitFor()
    await expectAccessible(page, 'site list (empty)')
    await page.getByRole('button', { name: 'Add a site' }).click()
    await page.getByRole('button', { name: 'Add site' }).click()
    await page.getByText('Enter a site code, like LMV-01.').first().waitFor()
    await expectAccessible(page, 'site form with errors')
    await page.getByLabel('Site code').fill('SG-01')
    await page.getByLabel('Name', { exact: true }).fill('Stonegate Primary')
    await page.getByRole('radio', { name: 'Switchyard' }).check()
    await page.getByLabel('Latitude (°)').fill('53.801')
    await page.getByLabel('Longitude (°)').fill('-1.549')
    await page.getByLabel('Voltage (kV)').fill('132')
    await page.getByRole('checkbox', { name: 'IR windows fitted' }).check()
    await page.getByRole('button', { name: 'Add site' }).click()
    await page.getByRole('heading', { level: 1, name: 'Stonegate Primary' }).waitFor()
    await page.getByText('53.8010° N, 1.5490° W').waitFor()
    await expectAccessible(page, 'site page')

    // An asset at that site.
    await page.getByRole('button', { name: 'Add an asset' }).click()
    await page.getByLabel('Label or position').fill('T1')
    await page.getByLabel('Class').selectOption('transformer')
    await page.getByLabel('Manufacturer').fill('Hallam Electric')
    await page.getByLabel('Rated current (A)').fill('800')
    await page.getByRole('checkbox', { name: 'N', exact: true }).check()
    await page.getByRole('button', { name: 'Add asset' }).click()
    const row = page.getByRole('region', { name: 'Assets table' }).getByRole('row', { name: /T1/ })
    await row.waitFor()
    expect(await row.textContent()).toContain('Hallam Electric')
    await expectAccessible(page, 'site page with an asset')

    // Import a sites file with one bad row.
    await page.goto(`/orgs/${slug}/register/import`)
    await page.getByRole('heading', { level: 1, name: 'Import the register' }).waitFor()
    await expectAccessible(page, 'import page')
    const bad = [SITES_HEADER, 'SG-02,Stonegate East,substation,53.8,-1.5,33,,,', 'SG-03,Stonegate Farm,farm,53.7,-1.4,11,,,', 'SG-04,Stonegate West,plant room,53.6,-1.3,,,,ir_windows'].join('\n')
    await page.getByRole('radio', { name: /^Sites/ }).check()
    await page.getByLabel('CSV file').setInputFiles({ name: 'stonegate.csv', mimeType: 'text/csv', buffer: Buffer.from(bad) })
    await page.getByRole('button', { name: 'Upload and check' }).click()
    await page.getByRole('heading', { name: 'Check of stonegate.csv' }).waitFor()
    await page.getByText('Unknown kind "farm". Use one of: substation, switchyard, plant_room, line_section.').waitFor()
    const problemRow = page.getByRole('region', { name: 'Problems in the file' }).getByRole('row', { name: /farm/ })
    expect((await problemRow.textContent())?.replace(/\s+/g, ' ')).toMatch(/^3\s?kind/)
    expect(await page.getByRole('button', { name: /^Import \d+ sites$/ }).count()).toBe(0)
    await expectAccessible(page, 'import preview with a bad row')

    // Fix the file and upload it again: all three rows go in.
    await page.getByRole('button', { name: 'Upload the fixed file' }).click()
    await page.getByRole('radio', { name: /^Sites/ }).check()
    await page.getByLabel('CSV file').setInputFiles({ name: 'stonegate-fixed.csv', mimeType: 'text/csv', buffer: Buffer.from(bad.replace(',farm,', ',substation,')) })
    await page.getByRole('button', { name: 'Upload and check' }).click()
    await page.getByRole('button', { name: 'Import 3 sites' }).click()
    await page.getByText('3 sites from stonegate-fixed.csv are now in the register.').waitFor()
    await expectAccessible(page, 'import done')

    // The big list finds them on the server.
    await page.goto(`/orgs/${slug}/sites?q=stonegate`)
    await page.getByRole('link', { name: 'Stonegate Farm' }).waitFor()
    expect(await page.getByRole('region', { name: 'Sites table' }).getByRole('row').count()).toBe(5)
    await page.goto(`/orgs/${slug}/assets`)
    await page.getByRole('link', { name: 'T1' }).waitFor()
    await expectAccessible(page, 'asset list')
    await page.getByRole('link', { name: 'T1' }).click()
    await page.getByRole('heading', { level: 1, name: 'T1' }).waitFor()
    await expectAccessible(page, 'asset page')
    await context.close()
  })

  it('shows a viewer the register without edit controls', async () => {
    const { client: owner } = await signUpOwner('Vic Dale', 'vic@register-browser.test', 'Dale Networks')
    const orgs = (await owner.get('/api/orgs')).body as Array<{ slug: string }>
    const dale = orgs[0]!.slug
    await owner.post(`/api/orgs/${dale}/invitations`, { email: 'vera@register-browser.test', role: 'viewer' })
    const [mail] = await mailFor('vera@register-browser.test')
    const token = linkIn(mail!.text, '/invitations/').split('/invitations/')[1]!
    await new ApiClient().post('/api/account/sign-up', { name: 'Vera Lund', email: 'vera@register-browser.test', password: 'vera long password', invitationToken: token })
    const { context, page } = await newSession(browser)
    await signIn(page, 'vera@register-browser.test', 'vera long password')
    await page.goto(`/orgs/${dale}/sites`)
    await page.getByRole('heading', { level: 1, name: 'Sites' }).waitFor()
    expect(await page.getByRole('button', { name: 'Add a site' }).count()).toBe(0)
    expect(await page.getByRole('link', { name: 'Import CSV' }).count()).toBe(0)
    await page.getByRole('link', { name: 'Export sites (CSV)' }).waitFor()
    await context.close()
  })
})
