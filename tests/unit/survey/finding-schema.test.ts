import { describe, expect, it } from 'vitest'
import { checkSchema, findingChainInput, findingSchema } from '../../../shared/schemas/survey'
import { correctionChain, ZERO_CELSIUS_K } from '../../../shared/thermal/index'

const base = {
  assetId: '00000000-0000-4000-8000-000000000001', component: 'Connector', apparentC: '50', emissivity: '0.9', reflectedC: '20',
  reflectedMethod: 'direct', probableCause: 'overload',
}

function objectC(values: Record<string, unknown>, band: [number, number]): number {
  const parsed = findingSchema.parse(values)
  const { reading, options } = findingChainInput(parsed, { bandFromUm: band[0], bandToUm: band[1] })
  return correctionChain(reading, options).hotObjectK - ZERO_CELSIUS_K
}

describe('finding schema and engine input', () => {
  it('turns typed strings into the engine reading for the survey imager band', () => {
    // reference sheet §5 [C] independent computation: 8–14 µm, T_app 50 °C, ε 0.50, T_refl 20 °C → 74.340 °C
    expect(objectC({ ...base, emissivity: '0.5' }, [8, 14])).toBeCloseTo(74.34, 2)
    // reference sheet §5 [C]: MWIR 3–5 µm, T_app 50 °C, ε 0.9, T_refl 20 °C → 52.208 °C
    expect(objectC(base, [3, 5])).toBeCloseTo(52.208, 2)
    // reference sheet §5 [C]: 8–14 µm, T_app 60 °C, ε 0.9, T_refl 20 °C, τ 0.95 with the path at 20 °C → 65.712 °C
    expect(objectC({ ...base, apparentC: '60', transmittance: '0.95', ambientC: '20' }, [8, 14])).toBeCloseTo(65.712, 2)
  })

  it('puts each bad input at its field', () => {
    const errors = (v: Record<string, unknown>) => findingSchema.safeParse({ ...base, ...v }).error?.issues.map((i) => i.path.join('.')) ?? []
    expect(errors({ apparentC: '-280' })).toContain('apparentC')
    expect(errors({ emissivity: '0' })).toContain('emissivity')
    expect(errors({ windowTransmittance: '0.5' })).toContain('windowC')
    expect(errors({ referenceC: '51' })).toContain('referenceC')
    expect(errors({ loadA: '1900', ratedA: '600' })).toContain('loadA')
    expect(errors({ loadA: '1700', ratedA: '600' })).toEqual([])
  })

  it('asks for a reason exactly when an asset was not reached', () => {
    const assetId = base.assetId
    expect(checkSchema.safeParse({ assetId, outcome: 'not_reached' }).success).toBe(false)
    expect(checkSchema.safeParse({ assetId, outcome: 'not_reached', reason: 'outage' }).success).toBe(true)
    expect(checkSchema.safeParse({ assetId, outcome: 'clear', reason: 'outage' }).success).toBe(false)
    expect(checkSchema.safeParse({ assetId, outcome: 'not_reached', reason: 'other' }).success).toBe(false)
  })
})
