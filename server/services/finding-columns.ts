// The columns a finding (or a verification re-scan) stores: its reading's inputs and what the engine computed.
// Pure and free of Nuxt aliases, so the large seed (scripts/seed-large-fieldwork.ts) stores exactly what the server does.
import { ZERO_CELSIUS_K, type correctionChain } from '../../shared/thermal/index'
import type { FindingValues } from '../../shared/schemas/survey'

const kToC = (k: number) => k - ZERO_CELSIUS_K

type Chain = ReturnType<typeof correctionChain>
type ReadingInput = Pick<FindingValues, 'apparentC' | 'referenceC' | 'ambientC' | 'emissivity' | 'reflectedC' | 'reflectedMethod'
  | 'distanceM' | 'transmittance' | 'windowTransmittance' | 'windowC' | 'loadA' | 'ratedA' | 'windMs'>

/** The reading's inputs as stored (°C, metres, A, m/s) — the same columns on findings and verifications. */
export function readingColumns(input: ReadingInput) {
  return {
    apparent_c: input.apparentC!, reference_c: input.referenceC ?? null, ambient_c: input.ambientC ?? null, emissivity: input.emissivity!,
    reflected_c: input.reflectedC!, reflected_method: input.reflectedMethod, distance_m: input.distanceM ?? null,
    transmittance: input.transmittance ?? null, window_transmittance: input.windowTransmittance ?? null, window_c: input.windowC ?? null,
    load_a: input.loadA ?? null, rated_a: input.ratedA ?? null, wind_ms: input.windMs ?? null,
  }
}

/** What the engine computed, as stored beside the inputs, with the criteria set's id and version it ranked with. */
export function computedColumns(chain: Chain) {
  return {
    object_c: kToC(chain.hotObjectK),
    rise_over_reference_k: chain.measured.overReferenceK ?? null,
    rise_over_ambient_k: chain.measured.overAmbientK ?? null,
    load_scaled_rise_k: chain.loadFactor !== null ? (chain.ranked.overReferenceK ?? chain.ranked.overAmbientK ?? null) : null,
    band: chain.rank.band,
    band_basis: chain.rank.basis,
    uncertainty_low_c: chain.hotInterval ? kToC(chain.hotInterval.low) : null,
    uncertainty_high_c: chain.hotInterval ? kToC(chain.hotInterval.high) : null,
    warnings: JSON.stringify(chain.warnings),
    criteria_id: chain.rank.criteriaId,
    criteria_version: chain.rank.criteriaVersion,
  }
}
