import { type CorrectionInput, type MeasurementTerms, measurementTerms, validateCorrectionInput } from './correction'
import { ThermalInputError } from './errors'
import { type Band, bandRadianceDerivativeUnchecked, bandRadianceUnchecked, invertRadiance, INVERSE_RANGE_K } from './planck'

/** Parameters of a whole-frame correction; ε may differ per pixel. */
export interface FrameParams extends Omit<CorrectionInput, 'apparentK' | 'emissivity'> {
  /** One emissivity for the frame, or one per pixel (same length as the frame). */
  emissivity: number | Float32Array | Float64Array
  /** Where to write the result (reused between frames to avoid allocation). */
  out?: Float32Array
}

/**
 * Dense tables for one band, built once and cached:
 * - forward: W(T) on a uniform T grid (step 2 K), cubic Hermite with the exact dW/dT at the nodes;
 * - inverse: T as a function of W, in segments of equal width inside each binary octave of W
 *   (64 per octave), cubic Hermite with the exact dT/dW at the segment ends.
 * Segments of constant relative width keep T(W) gently curved in each one from the cold end of MWIR to
 * the hot end of LWIR, like a table in ln W would, but the segment is found from the bits of the
 * floating-point number (exponent = octave, leading mantissa bits = segment), which costs far less than
 * Math.log. Each segment stores its four polynomial coefficients: one index, four adjacent loads and a
 * Horner evaluation per lookup. For each ε in use a third, per-call table maps T_app straight to T_obj
 * (see compositeTable), so most pixels cost a single lookup.
 */
export interface FrameTables {
  tMin: number
  tMax: number
  fwdInvStep: number
  fwdCount: number
  fwd: Float64Array
  /** Unbiased binary exponent of the first octave in the inverse table. */
  octaveMin: number
  octaveCount: number
  inv: Float64Array
}

/** Range of the tables, K; pixels outside it fall back to the exact (slow) path. */
export const FRAME_TABLE_RANGE_K = { min: 150, max: 3000 } as const
const FORWARD_STEP_K = 2
const SEGMENT_BITS = 6
const SEGMENTS = 1 << SEGMENT_BITS
// The mantissa bits below the segment number, as a fraction of the segment: the high word's low
// (20 − SEGMENT_BITS) bits and the 32 bits of the low word.
const SEG_LOW_MASK = (1 << (20 - SEGMENT_BITS)) - 1
const SEG_HI_SCALE = 2 ** -(20 - SEGMENT_BITS)
const SEG_LO_SCALE = 2 ** -(52 - SEGMENT_BITS)

// Reads the two 32-bit halves of a double; the high half's index depends on the platform's byte order.
const scratch = new Float64Array(1)
const scratchWords = new Int32Array(scratch.buffer)
scratch[0] = 1
const HI = scratchWords[1] === 0x3ff00000 ? 1 : 0
const LO = 1 - HI

const tableCache = new Map<string, FrameTables>()

function hermiteCoefficients(out: Float64Array, j: number, y0: number, y1: number, m0: number, m1: number): void {
  // p(f) = y0 + m0·f + c2·f² + c3·f³ on f ∈ [0, 1], slopes m already scaled by the step.
  out[4 * j] = y0
  out[4 * j + 1] = m0
  out[4 * j + 2] = 3 * (y1 - y0) - 2 * m0 - m1
  out[4 * j + 3] = 2 * (y0 - y1) + m0 + m1
}

/** Builds (or returns the cached) lookup tables for a band. */
export function frameTables(band: Band): FrameTables {
  const key = `${band.fromUm}|${band.toUm}`
  const cached = tableCache.get(key)
  if (cached) return cached
  const { fromUm, toUm } = band
  const tMin = FRAME_TABLE_RANGE_K.min
  const tMax = FRAME_TABLE_RANGE_K.max

  const fwdCount = Math.round((tMax - tMin) / FORWARD_STEP_K)
  const fwd = new Float64Array(4 * fwdCount)
  let w0 = bandRadianceUnchecked(tMin, fromUm, toUm)
  let d0 = bandRadianceDerivativeUnchecked(tMin, fromUm, toUm) * FORWARD_STEP_K
  for (let j = 0; j < fwdCount; j++) {
    const t1 = tMin + (j + 1) * FORWARD_STEP_K
    const w1 = bandRadianceUnchecked(t1, fromUm, toUm)
    const d1 = bandRadianceDerivativeUnchecked(t1, fromUm, toUm) * FORWARD_STEP_K
    hermiteCoefficients(fwd, j, w0, w1, d0, d1)
    w0 = w1
    d0 = d1
  }

  const octaveMin = Math.floor(Math.log2(bandRadianceUnchecked(tMin, fromUm, toUm)))
  const octaveCount = Math.floor(Math.log2(bandRadianceUnchecked(tMax, fromUm, toUm))) - octaveMin + 1
  const segCount = octaveCount * SEGMENTS
  const inv = new Float64Array(4 * segCount)
  let wa = 2 ** octaveMin
  let ta = invertRadiance(wa, fromUm, toUm, tMin)
  for (let j = 0; j < segCount; j++) {
    const octave = octaveMin + Math.floor(j / SEGMENTS)
    const width = 2 ** octave / SEGMENTS
    const wb = 2 ** octave * (1 + ((j % SEGMENTS) + 1) / SEGMENTS)
    const tb = invertRadiance(wb, fromUm, toUm, ta)
    hermiteCoefficients(inv, j, ta, tb, slopeTOverW(ta, fromUm, toUm) * width, slopeTOverW(tb, fromUm, toUm) * width)
    wa = wb
    ta = tb
  }

  const tables: FrameTables = { tMin, tMax, fwdInvStep: 1 / FORWARD_STEP_K, fwdCount, fwd, octaveMin, octaveCount, inv }
  if (tableCache.size > 16) tableCache.clear()
  tableCache.set(key, tables)
  return tables
}

function slopeTOverW(tempK: number, fromUm: number, toUm: number): number {
  return 1 / bandRadianceDerivativeUnchecked(tempK, fromUm, toUm)
}

/**
 * Corrects a whole grid of apparent temperatures (K) to object temperatures (K) with the band
 * measurement equation. Pixels that no object temperature can explain, or whose ε is outside (0, 1],
 * come out as NaN rather than throwing, so one bad pixel does not lose a frame.
 */
export function correctFrame(apparentK: Float32Array | Float64Array, params: FrameParams): Float32Array {
  const n = apparentK.length
  const scalarEps = typeof params.emissivity === 'number'
  validateCorrectionInput({ ...params, apparentK: 300, emissivity: scalarEps ? (params.emissivity as number) : 1 })
  const epsArray = scalarEps ? null : (params.emissivity as Float32Array | Float64Array)
  if (epsArray && epsArray.length !== n) {
    throw new ThermalInputError('invalid-input', 'The emissivity grid must have one value per pixel.', 'emissivity')
  }
  const out = params.out && params.out.length === n ? params.out : new Float32Array(n)
  const terms = measurementTerms(params)
  const tables = frameTables(params.band)
  const misses = epsArray
    ? kernelPerPixel(apparentK, epsArray, out, tables, terms.alpha, terms.beta, terms.reflectedRadiance, paintedInRegions(epsArray))
    : kernelScalar(apparentK, 1 / (params.emissivity as number), out, tables, terms.alpha, terms.beta, terms.reflectedRadiance)
  // The hot loops only handle pixels inside the tables and mark the rest with MISS; these few take the
  // exact path here, so the loops stay free of calls and their type feedback stays clean.
  if (misses > 0) {
    const { fromUm, toUm } = params.band
    for (let i = 0; i < n; i++) {
      if (out[i] !== MISS) continue
      const e = epsArray ? epsArray[i]! : (params.emissivity as number)
      out[i] = exactPixel(apparentK[i]!, e, terms, fromUm, toUm)
    }
  }
  return out
}

/** Marks a pixel for the exact path; object temperatures are always positive. */
const MISS = -1

function exactPixel(apparentK: number, emissivity: number, terms: MeasurementTerms, fromUm: number, toUm: number): number {
  if (!(apparentK > 0 && apparentK < INVERSE_RANGE_K.max && emissivity > 0 && emissivity <= 1)) return Number.NaN
  const w = bandRadianceUnchecked(apparentK, fromUm, toUm)
  const wo = (w * terms.alpha + terms.beta) / emissivity + terms.reflectedRadiance
  if (!(wo > 0)) return Number.NaN
  try {
    return invertRadiance(wo, fromUm, toUm, apparentK)
  } catch {
    return Number.NaN
  }
}

/** Largest disagreement, K, allowed between a composite-table interval and the two-table path at its midpoint. */
const COMPOSITE_CHECK_K = 1e-4

/**
 * For one ε the whole correction is a smooth function T_obj(T_app), so it gets its own table on the
 * forward grid (built per call from the band tables in well under a millisecond): values from the
 * two-table path, slopes from the chain rule α/ε·W′(T_app)·dT/dW(T_obj). An interval whose ends cannot be
 * explained, or whose midpoint disagrees with the two-table path by more than COMPOSITE_CHECK_K (steep
 * stretches near the point where the reflection outshines the target), is marked NaN and its pixels take
 * the two-table path instead. The cubic's error peaks near the midpoint, so the check bounds it.
 */
function compositeTable(tb: FrameTables, a: number, b: number, segBase: number, segCount: number): Float64Array {
  const { fwdCount, fwd, inv } = tb
  const val = new Float64Array(fwdCount + 1)
  const slope = new Float64Array(fwdCount + 1)
  for (let m = 0; m <= fwdCount; m++) {
    const k = 4 * Math.min(m, fwdCount - 1)
    const atEnd = m === fwdCount
    const w = atEnd ? fwd[k]! + fwd[k + 1]! + fwd[k + 2]! + fwd[k + 3]! : fwd[k]!
    const dw = atEnd ? fwd[k + 1]! + 2 * fwd[k + 2]! + 3 * fwd[k + 3]! : fwd[k + 1]!
    const wo = w * a + b
    const seg = segmentOf(wo, segBase, segCount)
    if (seg < 0) {
      val[m] = Number.NaN
      continue
    }
    const f = fractionOf()
    const width = segmentWidthOfLast()
    const q = 4 * seg
    val[m] = inv[q]! + f * (inv[q + 1]! + f * (inv[q + 2]! + f * inv[q + 3]!))
    // dT/dW in segment units, divided by the segment's width in W, times dW_obj/ds = a·dW_app/ds.
    const dTdSeg = inv[q + 1]! + f * (2 * inv[q + 2]! + 3 * f * inv[q + 3]!)
    slope[m] = (dTdSeg / width) * a * dw
  }
  const comp = new Float64Array(4 * fwdCount)
  for (let j = 0; j < fwdCount; j++) {
    const y0 = val[j]!
    const y1 = val[j + 1]!
    if (!(y0 === y0 && y1 === y1)) {
      comp[4 * j] = Number.NaN
      continue
    }
    hermiteCoefficients(comp, j, y0, y1, slope[j]!, slope[j + 1]!)
    const k = 4 * j
    const mid = lookupInverse((fwd[k]! + 0.5 * (fwd[k + 1]! + 0.5 * (fwd[k + 2]! + 0.5 * fwd[k + 3]!))) * a + b, inv, segBase, segCount)
    const guess = comp[k]! + 0.5 * (comp[k + 1]! + 0.5 * (comp[k + 2]! + 0.5 * comp[k + 3]!))
    if (mid === MISS || !(Math.abs(mid - guess) <= COMPOSITE_CHECK_K)) comp[k] = Number.NaN
  }
  return comp
}

/** Segment number of w in the inverse table (−1 outside it); leaves w's bits in the scratch words. */
function segmentOf(w: number, segBase: number, segCount: number): number {
  if (!(w > 0)) return -1
  scratch[0] = w
  const seg = (scratchWords[HI]! >>> (20 - SEGMENT_BITS)) - segBase
  return seg >= 0 && seg < segCount ? seg : -1
}

/** Position inside the segment, [0, 1), of the number last passed to segmentOf. */
function fractionOf(): number {
  return (scratchWords[HI]! & SEG_LOW_MASK) * SEG_HI_SCALE + (scratchWords[LO]! >>> 0) * SEG_LO_SCALE
}

/** Width in W of the segment holding the number last passed to segmentOf (its octave from the exponent bits). */
function segmentWidthOfLast(): number {
  return 2 ** (((scratchWords[HI]! >>> 20) & 0x7ff) - 1023) / SEGMENTS
}

function kernelScalar(
  app: Float32Array | Float64Array,
  invEps: number,
  out: Float32Array,
  tb: FrameTables,
  alpha: number,
  beta: number,
  wr: number,
): number {
  const { tMin, tMax, fwdInvStep, fwd, octaveMin, octaveCount, inv } = tb
  const segBase = (octaveMin + 1023) << SEGMENT_BITS
  const segCount = octaveCount << SEGMENT_BITS
  const a = alpha * invEps
  const b = beta * invEps + wr
  const comp = compositeTable(tb, a, b, segBase, segCount)
  let misses = 0
  for (let i = 0, n = app.length; i < n; i++) {
    const t = app[i]!
    if (!(t >= tMin && t < tMax)) {
      out[i] = MISS
      misses++
      continue
    }
    const s = (t - tMin) * fwdInvStep
    const j = s | 0
    const f = s - j
    const k = 4 * j
    const c0 = comp[k]!
    if (c0 === c0) {
      out[i] = c0 + f * (comp[k + 1]! + f * (comp[k + 2]! + f * comp[k + 3]!))
      continue
    }
    const wo = (fwd[k]! + f * (fwd[k + 1]! + f * (fwd[k + 2]! + f * fwd[k + 3]!))) * a + b
    const r = lookupInverse(wo, inv, segBase, segCount)
    if (r === MISS) misses++
    out[i] = r
  }
  return misses
}

/** Most distinct ε values in one frame that get their own composite table (surface regions, not noise). */
const MAX_COMPOSITES = 16

/** True when ε comes in long runs (a region mask) rather than changing from pixel to pixel. */
function paintedInRegions(eps: Float32Array | Float64Array): boolean {
  let changes = 0
  for (let i = 1, n = eps.length; i < n; i++) if (eps[i] !== eps[i - 1]) changes++
  // Runs averaging 64 pixels or more repay building a table per value; a noisy map does not.
  return changes * 64 <= eps.length
}

/**
 * Per-pixel ε. Emissivity grids are usually painted per surface region, so a few values repeat in long runs:
 * then each distinct value (up to MAX_COMPOSITES) gets a composite table, switched only when the value
 * changes. A map that changes from pixel to pixel, values beyond MAX_COMPOSITES and intervals the composite
 * check rejected take the two-table path.
 */
function kernelPerPixel(
  app: Float32Array | Float64Array,
  eps: Float32Array | Float64Array,
  out: Float32Array,
  tb: FrameTables,
  alpha: number,
  beta: number,
  wr: number,
  useComposites: boolean,
): number {
  const { tMin, tMax, fwdInvStep, fwd, octaveMin, octaveCount, inv } = tb
  const segBase = (octaveMin + 1023) << SEGMENT_BITS
  const segCount = octaveCount << SEGMENT_BITS
  const composites = new Map<number, Float64Array>()
  let lastE = Number.NaN
  let comp: Float64Array | null = null
  let misses = 0
  for (let i = 0, n = app.length; i < n; i++) {
    const t = app[i]!
    const e = eps[i]!
    if (!(t >= tMin && t < tMax && e > 0 && e <= 1)) {
      out[i] = MISS
      misses++
      continue
    }
    if (useComposites && e !== lastE) {
      lastE = e
      comp = composites.get(e) ?? null
      if (!comp && composites.size < MAX_COMPOSITES) {
        comp = compositeTable(tb, alpha / e, beta / e + wr, segBase, segCount)
        composites.set(e, comp)
      }
    }
    const s = (t - tMin) * fwdInvStep
    const j = s | 0
    const f = s - j
    const k = 4 * j
    if (comp) {
      const c0 = comp[k]!
      if (c0 === c0) {
        out[i] = c0 + f * (comp[k + 1]! + f * (comp[k + 2]! + f * comp[k + 3]!))
        continue
      }
    }
    const wo = ((fwd[k]! + f * (fwd[k + 1]! + f * (fwd[k + 2]! + f * fwd[k + 3]!))) * alpha + beta) / e + wr
    const r = lookupInverse(wo, inv, segBase, segCount)
    if (r === MISS) misses++
    out[i] = r
  }
  return misses
}

/** T for radiance w from the inverse table, or MISS when w is not positive or outside the table. */
function lookupInverse(w: number, inv: Float64Array, segBase: number, segCount: number): number {
  if (!(w > 0)) return MISS
  scratch[0] = w
  const hi = scratchWords[HI]!
  // Biased exponent and the top SEGMENT_BITS of the mantissa, read together, number the segment.
  const seg = (hi >>> (20 - SEGMENT_BITS)) - segBase
  if (seg < 0 || seg >= segCount) return MISS
  const f = (hi & SEG_LOW_MASK) * SEG_HI_SCALE + (scratchWords[LO]! >>> 0) * SEG_LO_SCALE
  const k = 4 * seg
  return inv[k]! + f * (inv[k + 1]! + f * (inv[k + 2]! + f * inv[k + 3]!))
}
