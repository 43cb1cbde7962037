import type { Browser } from 'playwright-core'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { signUpOwner } from '../support/api'
import { expectAccessible, launchBrowser, newSession, signInWithForm } from '../support/browser'
import { resetDatabase } from '../support/db'

let browser: Browser

beforeAll(async () => {
  await resetDatabase()
  await signUpOwner('Wren Hale', 'wren@workbench.test', 'Hale Power', 'wren long password')
  browser = await launchBrowser()
})
afterAll(async () => {
  await browser?.close()
})

describe('the correction workbench in a browser', () => {
  it('corrects a shared reading, ranks it, and updates live as a value is typed', async () => {
    const { context, page } = await newSession(browser, { phone: true })
    await signInWithForm(page, 'wren@workbench.test', 'wren long password')
    await page.waitForURL('**/orgs/hale-power')
    // Reference sheet §5 [C] independent SciPy computation: 8–14 µm, T_app 50 °C, ε 0.5, T_refl 20 °C → 74.340 °C.
    await page.goto('/orgs/hale-power/workbench?hot=50&ambient=25&reflected=20&emissivity=0.5&band=lwir-8-14&exponent=2&criteria=neta-100-18')
    await page.getByTestId('wb-object').filter({ hasText: '74.3 °C' }).waitFor()
    // 74.34 − 25 ≈ 49.3 K over ambient: above 40 K → band 1 (ANSI/NETA Table 100.18).
    expect(await page.getByTestId('wb-band').innerText()).toBe('Band 1')
    expect(await page.getByRole('main').innerText()).toMatch(/not an instruction to approach/i)
    await expectAccessible(page, 'workbench (phone)')
    await page.locator('#wb-emissivity').fill('0.95')
    // ε 0.95 → 51.392 °C (reference sheet §5); 26.4 K over ambient → band 2.
    await page.getByTestId('wb-object').filter({ hasText: '51.4 °C' }).waitFor()
    expect(await page.getByTestId('wb-band').innerText()).toBe('Band 2')
    await page.waitForURL(/emissivity=0\.95/)
    await context.close()
  })
})
