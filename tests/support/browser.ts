import { readFileSync } from 'node:fs'
import { createRequire } from 'node:module'
import { chromium, type Browser, type BrowserContext, type Page } from 'playwright-core'
import { expect, inject } from 'vitest'

const require = createRequire(import.meta.url)
let axeSource: string | undefined

/** Debian's Chromium, headless, with the flags a root sandbox without network needs. Never a downloaded browser. */
export function launchBrowser(): Promise<Browser> {
  return chromium.launch({
    executablePath: process.env.CHROMIUM_PATH || '/usr/bin/chromium',
    args: ['--no-sandbox', '--disable-gpu', '--disable-quic', '--no-first-run', '--disable-background-networking',
      '--disable-component-update', '--disable-sync', '--disable-dev-shm-usage'],
  })
}

/** A fresh browser profile (its own cookies) aimed at the test server; phone-sized when asked. */
export async function newSession(browser: Browser, opts: { phone?: boolean } = {}): Promise<{ context: BrowserContext; page: Page }> {
  const context = await browser.newContext({
    baseURL: inject('baseUrl'),
    viewport: opts.phone ? { width: 390, height: 844 } : { width: 1280, height: 860 },
    isMobile: !!opts.phone,
    hasTouch: !!opts.phone,
  })
  context.setDefaultTimeout(15_000)
  // Every full page load of the app waits for hydration (plugins/hydrated.client.ts), for every page of the context.
  context.on('page', waitForHydrationOnLoad)
  const page = await context.newPage()
  waitForHydrationOnLoad(page)
  return { context, page }
}

const hydrationWrapped = new WeakSet<Page>()

/** Makes page.goto, page.reload and page.waitForURL return only once the app has hydrated (other origins are left alone). */
function waitForHydrationOnLoad(page: Page): void {
  if (hydrationWrapped.has(page)) return
  hydrationWrapped.add(page)
  const goto = page.goto.bind(page)
  const reload = page.reload.bind(page)
  page.goto = (async (...args: Parameters<Page['goto']>) => {
    const res = await goto(...args)
    await waitForHydration(page)
    return res
  }) as Page['goto']
  page.reload = (async (...args: Parameters<Page['reload']>) => {
    const res = await reload(...args)
    await waitForHydration(page)
    return res
  }) as Page['reload']
  // A redirect after signing in is a full load too: waiting for its URL also waits for the app to take over.
  const waitForURL = page.waitForURL.bind(page)
  page.waitForURL = (async (...args: Parameters<Page['waitForURL']>) => {
    await waitForURL(...args)
    await waitForHydration(page)
  }) as Page['waitForURL']
}

/** Waits until the app has hydrated the current page, when the page is the app's. */
export async function waitForHydration(page: Page): Promise<void> {
  if (new URL(page.url()).origin !== new URL(inject('baseUrl')).origin) return
  await page.waitForSelector('html[data-hydrated]', { state: 'attached', timeout: 30_000 })
}

/** Runs axe-core on the page and fails on any serious or critical violation, listing them. */
export async function expectAccessible(page: Page, label: string): Promise<void> {
  // Evaluated through the DevTools protocol, not added as a <script>: the app's content security policy (rightly)
  // refuses scripts it did not render itself.
  await page.evaluate(axeSource ??= readFileSync(require.resolve('axe-core/axe.min.js'), 'utf8'))
  const violations = await page.evaluate(async () => {
    const result = await (window as unknown as { axe: { run: (ctx: Document, opts: object) => Promise<any> } }).axe.run(document, {
      resultTypes: ['violations'],
    })
    return result.violations
      .filter((v: { impact: string }) => v.impact === 'serious' || v.impact === 'critical')
      .map((v: { id: string; impact: string; help: string; nodes: Array<{ target: string[] }> }) =>
        `${v.impact} ${v.id}: ${v.help} → ${v.nodes.slice(0, 3).map((n) => n.target.join(' ')).join(' | ')}`)
  })
  expect(violations, `accessibility on ${label}`).toEqual([])
}

/**
 * Signs in through the sign-in form (page.goto waits for hydration: a click before Vue has taken over the form would
 * submit it natively and never reach the app's sign-in). By default it then waits to land in an organisation;
 * `{ landing: false }` returns right after the click (for refusals).
 */
export async function signInWithForm(page: Page, email: string, password: string, opts: { landing?: boolean } = {}): Promise<void> {
  await page.goto('/sign-in')
  await waitForHydration(page)
  await page.getByLabel('E-mail').fill(email)
  await page.getByLabel('Password', { exact: true }).fill(password)
  await page.getByRole('button', { name: 'Sign in' }).click()
  if (opts.landing !== false) await page.waitForURL(/\/orgs\//, { timeout: 30_000 })
}
