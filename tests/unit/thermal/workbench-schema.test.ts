import { describe, expect, it } from 'vitest'
import {
  WORKBENCH_EXAMPLE,
  chainInputFrom,
  convertForm,
  formFromQuery,
  queryFromForm,
  workbenchSchema,
  type WorkbenchForm,
} from '#shared/schemas/workbench'
import { correctionChain } from '#shared/thermal'

const C = { temperatureUnit: 'C', lengthUnit: 'm' } as const
const F = { temperatureUnit: 'F', lengthUnit: 'ft' } as const

function issues(form: WorkbenchForm, units = C): Record<string, string> {
  const r = workbenchSchema(units).safeParse(form)
  if (r.success) return {}
  return Object.fromEntries(r.error.issues.map((i) => [i.path.join('.'), i.message]))
}

describe('workbench schema', () => {
  it('accepts the example and turns it into the engine’s SI inputs', () => {
    const r = workbenchSchema(C).safeParse(WORKBENCH_EXAMPLE)
    expect(r.success).toBe(true)
    const { reading, options } = chainInputFrom(r.data!, C)
    expect(reading.hotApparentK).toBeCloseTo(273.15 + 46.5, 10)
    expect(reading.band).toEqual({ fromUm: 7.5, toUm: 14 })
    expect(options.criteria?.id).toBe('neta-100-18')
    expect(options.tolerances?.instrument).toEqual({ absoluteK: 2, relativePct: 2 })
  })

  it('gives the same corrected result whether the reading is entered in °C/m or °F/ft', () => {
    const inF = convertForm(WORKBENCH_EXAMPLE, C, F)
    expect(Number(inF.hot)).toBeCloseTo(115.7, 6) // 46.5 °C = 115.7 °F
    expect(Number(inF.tolReflected)).toBeCloseTo(9, 6) // a 5 K tolerance is 9 °F of difference
    const a = chainInputFrom(workbenchSchema(C).parse(WORKBENCH_EXAMPLE), C)
    const b = chainInputFrom(workbenchSchema(F).parse(inF), F)
    expect(correctionChain(b.reading, b.options).hotObjectK).toBeCloseTo(correctionChain(a.reading, a.options).hotObjectK, 6)
    expect(b.reading.distanceM).toBeCloseTo(4, 6)
    expect(b.reading.targetMm).toBeCloseTo(40, 3)
  })

  it('writes the address in °C, m and mm whatever the person’s units, and reads it back', () => {
    const inF = convertForm(WORKBENCH_EXAMPLE, C, F)
    const q = queryFromForm(inF, F)
    expect(q.hot).toBe('46.5')
    expect(q.distance).toBe('4')
    expect(q.windApply).toBeUndefined()
    expect(formFromQuery(q, C).hot).toBe('46.5')
    expect(formFromQuery(q, F).hot).toBe(inF.hot)
    expect(formFromQuery({}, C)).toEqual(WORKBENCH_EXAMPLE) // no reading in the address: the example
  })

  it('puts a message beside each field that is wrong', () => {
    const bad = issues({ ...WORKBENCH_EXAMPLE, hot: 'abc', emissivity: '1.2', reflected: '-300', ifov: '0' })
    expect(bad.hot).toMatch(/as a number/)
    expect(bad.emissivity).toMatch(/0\.01 to 1/)
    expect(bad.reflected).toMatch(/between -100 °C and 2000 °C/)
    expect(bad.ifov).toMatch(/above 0/)
    expect(issues({ ...WORKBENCH_EXAMPLE, hot: '' }).hot).toMatch(/Enter the apparent hot-spot temperature/)
  })

  it('checks fields that belong together', () => {
    expect(issues({ ...WORKBENCH_EXAMPLE, band: 'custom', bandFrom: '14', bandTo: '8' }).bandTo).toMatch(/above the short edge/)
    expect(issues({ ...WORKBENCH_EXAMPLE, rated: '' }).rated).toMatch(/both the load and the rated current/)
    expect(issues({ ...WORKBENCH_EXAMPLE, windowTau: '0.5' }).windowTemp).toMatch(/transmittance and its temperature/)
  })

  it('states temperature limits in the person’s unit', () => {
    expect(issues({ ...WORKBENCH_EXAMPLE, hot: '5000' }, { temperatureUnit: 'F', lengthUnit: 'm' }).hot).toMatch(/°F and 3632 °F/)
  })
})
