import { describe, expect, it } from 'vitest'
import { reactive } from 'vue'
import { mountSuspended, registerEndpoint } from '@nuxt/test-utils/runtime'
import WorkbenchChain from '~/components/workbench/WorkbenchChain.vue'
import WorkbenchBand from '~/components/workbench/WorkbenchBand.vue'
import WorkbenchWarnings from '~/components/workbench/WorkbenchWarnings.vue'
import WorkbenchForm from '~/components/workbench/WorkbenchForm.vue'
import { correctionChain, MIL_STD_2194, NETA_100_18 } from '#shared/thermal'
import { WORKBENCH_EXAMPLE } from '#shared/schemas/workbench'

// The page sits behind the auth middleware: answer as a signed-in person.
registerEndpoint('/api/auth/session', () => ({ user: { id: 'u-1', name: 'Test Person', email: 'test@example.org' }, expires: '2099-01-01T00:00:00.000Z' }))

const K = (c: number) => c + 273.15
const reading = {
  hotApparentK: K(50),
  referenceApparentK: K(35),
  ambientK: K(25),
  emissivity: 0.95,
  reflectedK: K(20),
  band: { fromUm: 8, toUm: 14 },
  loadA: 300,
  ratedA: 600,
}

describe('WorkbenchChain', () => {
  it('shows every step in order with the corrected temperature in the chosen unit', async () => {
    const result = correctionChain({ ...reading, loadA: undefined, ratedA: undefined })
    const w = await mountSuspended(WorkbenchChain, { props: { result, unit: 'C' } })
    const steps = w.findAll('[data-step]').map((s) => s.attributes('data-step'))
    expect(steps).toEqual(['apparent', 'corrected', 'rise', 'load', 'wind', 'band'])
    // 50 °C apparent, ε 0.95, 20 °C reflected, 8–14 µm → 51.392 °C ([C] SciPy, reference sheet §5)
    expect(w.find('[data-key="hotObject"]').text()).toContain('51.4 °C')
    expect(w.find('[data-key="band"]').text()).toContain('Band 1')
  })

  it('shows rises in °F of difference for a °F reader, and the load factor', async () => {
    const result = correctionChain(reading)
    const w = await mountSuspended(WorkbenchChain, { props: { result, unit: 'F' } })
    const rise = result.measured.overAmbientK! * 1.8
    expect(w.find('[data-key="measuredOverAmbient"]').text()).toContain(`${rise.toFixed(1)} °F`)
    expect(w.find('[data-key="loadFactor"]').text()).toContain('× 4.00') // (600/300)^2
  })
})

describe('WorkbenchBand', () => {
  it('renders the band, its action and deadline, in the band colour', async () => {
    const result = correctionChain(reading)
    const w = await mountSuspended(WorkbenchBand, { props: { rank: result.rank, criteria: NETA_100_18 } })
    expect(w.get('[data-testid="wb-band"]').text()).toBe(`Band ${result.rank.band}`)
    expect(w.get('[data-testid="wb-action"]').text()).toBe(result.rank.action)
    expect(w.html()).toContain(`bg-band-${result.rank.band}`)
  })

  it('says "Not ranked" in slate below the lowest band and flags sets from memory', async () => {
    const result = correctionChain({ ...reading, hotApparentK: K(26), referenceApparentK: K(25.8), loadA: undefined, ratedA: undefined }, { criteria: MIL_STD_2194 })
    const w = await mountSuspended(WorkbenchBand, { props: { rank: result.rank, criteria: MIL_STD_2194 } })
    expect(w.get('[data-testid="wb-band"]').text()).toBe('Not ranked')
    expect(w.html()).toContain('bg-clear-200')
    expect(w.text()).toContain('from memory')
  })
})

describe('WorkbenchWarnings', () => {
  it('lists the most serious first', async () => {
    const result = correctionChain({ ...reading, emissivity: 0.4, loadA: 100, windMs: 8 })
    const w = await mountSuspended(WorkbenchWarnings, { props: { warnings: result.warnings } })
    const codes = w.findAll('li').map((li) => li.attributes('data-code'))
    expect(codes[0]).toBe('wind-above-limit')
    expect(codes).toEqual(expect.arrayContaining(['load-low', 'emissivity-low']))
  })
})

describe('WorkbenchForm', () => {
  it('labels every field and marks invalid ones for assistive technology', async () => {
    const form = { ...WORKBENCH_EXAMPLE }
    const w = await mountSuspended(WorkbenchForm, {
      props: {
        form,
        errors: { hot: ['Enter the apparent hot-spot temperature.'] },
        unit: 'C',
        lengthUnit: 'm',
        temperatureUnit: 'C',
        lengthUnitChoice: 'm',
      },
    })
    const hot = w.get('#wb-hot')
    expect(hot.attributes('aria-invalid')).toBe('true')
    const described = hot.attributes('aria-describedby')!.split(' ')
    expect(described).toContain('wb-hot-error')
    expect(w.get('#wb-hot-error').text()).toContain('Enter the apparent hot-spot temperature.')
    for (const input of w.findAll('input[type="text"]')) {
      expect(w.find(`label[for="${input.attributes('id')}"]`).exists()).toBe(true)
    }
  })

  it('picking a surface sets ε and shows its source', async () => {
    const form = reactive({ ...WORKBENCH_EXAMPLE, surface: '', emissivity: '' })
    const w = await mountSuspended(WorkbenchForm, {
      props: { form, errors: {}, unit: 'C', lengthUnit: 'm', temperatureUnit: 'C', lengthUnitChoice: 'm' },
    })
    await w.get('#wb-surface').setValue('cu-oxidised')
    expect(form.emissivity).toBe('0.65')
    expect(w.text()).toContain('Source: Ede (1967)')
  })
})

describe('workbench page', () => {
  registerEndpoint('/api/orgs/demo', () => ({ slug: 'demo', name: 'Demo', myRole: 'viewer', loadExponent: 1.8, timeZone: 'UTC', version: 1, createdAt: '2025-01-01', counts: { sites: 0, assets: 0 } }))

  it('reads the reading from the address and writes edits back to it in °C', async () => {
    const { default: Page } = await import('~/pages/orgs/[org]/workbench.vue')
    // 50 °C apparent, 35 °C reference, 25 °C ambient, ε 0.95, 20 °C reflected, 8–14 µm → band 1 (reference sheet §5 reading)
    const w = await mountSuspended(Page, {
      route: '/orgs/demo/workbench?hot=50&reference=35&ambient=25&reflected=20&emissivity=0.95&band=lwir-8-14&exponent=2&criteria=neta-100-18',
    })
    expect(w.get('[data-testid="wb-object"]').text()).toBe('51.4 °C')
    expect(w.get('[data-testid="wb-band"]').text()).toBe('Band 1')
    await w.get('#wb-reference').setValue('')
    await w.get('#wb-hot').setValue('40')
    await new Promise((r) => setTimeout(r, 400))
    const router = useRouter()
    expect(router.currentRoute.value.query.hot).toBe('40')
    expect(router.currentRoute.value.query.reference).toBeUndefined()
    // ≈ 15.3 K over ambient → band 3 (ANSI/NETA Table 100.18)
    expect(w.get('[data-testid="wb-band"]').text()).toBe('Band 3')
  })

  it('shows field messages instead of a result for invalid input', async () => {
    const { default: Page } = await import('~/pages/orgs/[org]/workbench.vue')
    const w = await mountSuspended(Page, { route: '/orgs/demo/workbench?hot=abc&reflected=20&emissivity=1.4&exponent=2&criteria=neta-100-18' })
    expect(w.find('[data-testid="wb-band"]').exists()).toBe(false)
    expect(w.get('#wb-hot').attributes('aria-invalid')).toBe('true')
    expect(w.get('#wb-emissivity-error').text()).toContain('0.01 to 1')
    expect(w.text()).toContain('Check the highlighted fields')
  })
})
