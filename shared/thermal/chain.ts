import { ZERO_CELSIUS_K } from './constants'
import { type CorrectionInput, type WindowParams, objectTemperature, objectTemperatureSigma } from './correction'
import { isThermalInputError } from './errors'
import { type CriteriaSet, type RankResult, NETA_100_18, rankRise } from './criteria'
import { type WindFactor, loadScaleFactor, windFactor } from './load'
import type { Band } from './planck'
import { type Interval, type Tolerances, objectTemperatureInterval, riseInterval } from './uncertainty'
import { type ReadingWarning, type WarningLimits, readingWarnings } from './warnings'

/** The inputs of a finding (all temperatures in K, lengths in m or mm as named). */
export interface Reading {
  hotApparentK: number
  referenceApparentK?: number
  ambientK?: number
  emissivity: number
  /** ε of the reference component; defaults to the hot spot's. */
  referenceEmissivity?: number
  reflectedK: number
  transmittance?: number
  atmosphereK?: number
  window?: WindowParams
  band: Band
  loadA?: number
  ratedA?: number
  windMs?: number
  distanceM?: number
  ifovMrad?: number
  targetMm?: number
}

/** Tenant and instrument settings that shape the chain. */
export interface ChainOptions {
  criteria?: CriteriaSet
  /** Load exponent n, 1.6–2.0; default 2. */
  loadExponent?: number
  /** Multiply rises by the wind estimate (off by default: the table is unverified). */
  applyWindFactor?: boolean
  tolerances?: Tolerances
  calibrationDue?: Date | string
  today?: Date | string
  warningLimits?: Partial<WarningLimits>
}

/** How a chain value is to be shown: temperatures convert to °C/°F, differences to K/°F-difference. */
export type ChainValueKind = 'temperature' | 'difference' | 'factor' | 'percent' | 'speed' | 'days' | 'text'

/** One labelled value of a chain step, in SI units (K, m/s). */
export interface ChainValue {
  key: string
  label: string
  kind: ChainValueKind
  value: number | string | null
  interval?: Interval
}

/** One step of the correction chain. */
export interface ChainStep {
  id: 'apparent' | 'corrected' | 'rise' | 'load' | 'wind' | 'band'
  title: string
  note: string
  values: ChainValue[]
}

/** A pair of rises, K (absent when the comparison was not made). */
export interface Rises {
  overReferenceK?: number
  overAmbientK?: number
}

/** Everything the chain worked out, with the steps in order for display. */
export interface ChainResult {
  steps: ChainStep[]
  hotObjectK: number
  hotInterval?: Interval
  referenceObjectK?: number
  sigmaShortcutK: number | null
  measured: Rises
  loadFactor: number | null
  loadFraction: number | null
  wind: WindFactor | null
  windApplied: boolean
  /** The rises that were ranked (after load scaling and, if on, the wind estimate). */
  ranked: Rises
  rankedIntervals: { overReferenceK?: Interval; overAmbientK?: Interval }
  rank: RankResult
  warnings: ReadingWarning[]
}

function correctionInput(r: Reading, apparentK: number, emissivity: number): CorrectionInput {
  return {
    apparentK,
    emissivity,
    reflectedK: r.reflectedK,
    transmittance: r.transmittance,
    atmosphereK: r.atmosphereK,
    window: r.window,
    band: r.band,
  }
}

function scaleInterval(i: Interval | undefined, f: number): Interval | undefined {
  return i ? { low: i.low * f, high: i.high * f } : undefined
}

/**
 * The correction chain of one reading: apparent → corrected (band radiometry) → rises → load-scaled →
 * wind note → band. Throws ThermalInputError when the reading cannot be corrected.
 */
export function correctionChain(reading: Reading, options: ChainOptions = {}): ChainResult {
  const criteria = options.criteria ?? NETA_100_18
  const exponent = options.loadExponent ?? 2
  const tol = options.tolerances
  const hotIn = correctionInput(reading, reading.hotApparentK, reading.emissivity)
  const hotObjectK = objectTemperature(hotIn)
  let unbounded: string | null = null
  // An interval without a lower bound should not cost the person the result itself: drop the interval and say why.
  const bounded = <T>(f: () => T): T | undefined => {
    try {
      return f()
    } catch (e) {
      if (isThermalInputError(e) && e.code === 'uncertainty-unbounded') {
        unbounded = e.message
        return undefined
      }
      throw e
    }
  }
  const hotInterval = tol ? bounded(() => objectTemperatureInterval(hotIn, tol)) : undefined
  let sigmaShortcutK: number | null = null
  try {
    sigmaShortcutK = objectTemperatureSigma(hotIn)
  } catch {
    sigmaShortcutK = null
  }

  let referenceObjectK: number | undefined
  let refInterval: Interval | undefined
  if (reading.referenceApparentK !== undefined) {
    const refIn = correctionInput(reading, reading.referenceApparentK, reading.referenceEmissivity ?? reading.emissivity)
    referenceObjectK = objectTemperature(refIn)
    refInterval = tol ? bounded(() => riseInterval(hotIn, refIn, tol)) : undefined
  }

  const measured: Rises = {
    overReferenceK: referenceObjectK !== undefined ? hotObjectK - referenceObjectK : undefined,
    overAmbientK: reading.ambientK !== undefined ? hotObjectK - reading.ambientK : undefined,
  }
  const ambInterval =
    hotInterval && reading.ambientK !== undefined
      ? { low: hotInterval.low - reading.ambientK, high: hotInterval.high - reading.ambientK }
      : undefined

  const hasLoad = reading.loadA !== undefined && reading.ratedA !== undefined
  const loadFactor = hasLoad ? loadScaleFactor(reading.loadA!, reading.ratedA!, exponent) : null
  const loadFraction = hasLoad ? reading.loadA! / reading.ratedA! : null
  const wind = reading.windMs !== undefined ? windFactor(reading.windMs) : null
  const windApplied = Boolean(options.applyWindFactor && wind)
  const factor = (loadFactor ?? 1) * (windApplied && wind ? wind.factor : 1)

  const scale = (v: number | undefined): number | undefined => (v === undefined ? undefined : v * factor)
  const ranked: Rises = { overReferenceK: scale(measured.overReferenceK), overAmbientK: scale(measured.overAmbientK) }
  const rankedIntervals = { overReferenceK: scaleInterval(refInterval, factor), overAmbientK: scaleInterval(ambInterval, factor) }
  const absoluteC = criteria.absoluteLimitsC ? hotObjectK - ZERO_CELSIUS_K : undefined
  const rank = rankRise({ ...ranked, absoluteC }, criteria)

  const warnings = readingWarnings(
    {
      loadA: reading.loadA,
      ratedA: reading.ratedA,
      emissivity: reading.emissivity,
      targetMm: reading.targetMm,
      ifovMrad: reading.ifovMrad,
      distanceM: reading.distanceM,
      windMs: reading.windMs,
      calibrationDue: options.calibrationDue,
      today: options.today,
      riseIntervals: tol ? rankedIntervals : undefined,
      criteria,
    },
    options.warningLimits,
  )
  if (unbounded) warnings.unshift({ code: 'uncertainty-unbounded', severity: 'critical', message: unbounded })

  const steps = buildSteps({
    reading,
    options: { exponent, windOn: Boolean(options.applyWindFactor) },
    hotObjectK,
    hotInterval,
    referenceObjectK,
    sigmaShortcutK,
    measured,
    measuredIntervals: { overReferenceK: refInterval, overAmbientK: ambInterval },
    loadFactor,
    loadFraction,
    wind,
    windApplied,
    ranked,
    rankedIntervals,
    rank,
    criteria,
  })

  return {
    steps,
    hotObjectK,
    hotInterval,
    referenceObjectK,
    sigmaShortcutK,
    measured,
    loadFactor,
    loadFraction,
    wind,
    windApplied,
    ranked,
    rankedIntervals,
    rank,
    warnings,
  }
}

interface StepInput {
  reading: Reading
  options: { exponent: number; windOn: boolean }
  hotObjectK: number
  hotInterval?: Interval
  referenceObjectK?: number
  sigmaShortcutK: number | null
  measured: Rises
  measuredIntervals: { overReferenceK?: Interval; overAmbientK?: Interval }
  loadFactor: number | null
  loadFraction: number | null
  wind: WindFactor | null
  windApplied: boolean
  ranked: Rises
  rankedIntervals: { overReferenceK?: Interval; overAmbientK?: Interval }
  rank: RankResult
  criteria: CriteriaSet
}

function riseValues(prefix: string, rises: Rises, intervals: StepInput['measuredIntervals']): ChainValue[] {
  const out: ChainValue[] = []
  if (rises.overReferenceK !== undefined) {
    out.push({ key: `${prefix}OverReference`, label: 'Rise over reference', kind: 'difference', value: rises.overReferenceK, interval: intervals.overReferenceK })
  }
  if (rises.overAmbientK !== undefined) {
    out.push({ key: `${prefix}OverAmbient`, label: 'Rise over ambient', kind: 'difference', value: rises.overAmbientK, interval: intervals.overAmbientK })
  }
  return out
}

function buildSteps(s: StepInput): ChainStep[] {
  const r = s.reading
  const bandText = `${r.band.fromUm}–${r.band.toUm} µm`
  const apparent: ChainValue[] = [{ key: 'hotApparent', label: 'Hot spot, apparent', kind: 'temperature', value: r.hotApparentK }]
  if (r.referenceApparentK !== undefined) apparent.push({ key: 'referenceApparent', label: 'Reference, apparent', kind: 'temperature', value: r.referenceApparentK })
  if (r.ambientK !== undefined) apparent.push({ key: 'ambient', label: 'Ambient air', kind: 'temperature', value: r.ambientK })
  apparent.push({ key: 'reflected', label: 'Reflected temperature', kind: 'temperature', value: r.reflectedK })
  if (r.atmosphereK !== undefined) apparent.push({ key: 'atmosphere', label: 'Air temperature of the path', kind: 'temperature', value: r.atmosphereK })
  if (r.window) apparent.push({ key: 'windowTemp', label: 'IR window temperature', kind: 'temperature', value: r.window.tempK })

  const corrected: ChainValue[] = [
    { key: 'hotObject', label: 'Hot spot, corrected', kind: 'temperature', value: s.hotObjectK, interval: s.hotInterval },
  ]
  if (s.referenceObjectK !== undefined) corrected.push({ key: 'referenceObject', label: 'Reference, corrected', kind: 'temperature', value: s.referenceObjectK })
  corrected.push({ key: 'sigmaShortcut', label: 'σT⁴ shortcut (comparison only)', kind: 'temperature', value: s.sigmaShortcutK })
  // Notes carry no temperatures: the screens convert values to the person's unit, but not free text.
  const pathParts = [`ε ${r.emissivity}`]
  if (r.transmittance !== undefined && r.transmittance !== 1) pathParts.push(`τ ${r.transmittance}`)
  if (r.window) pathParts.push(`window τ ${r.window.transmittance}`)

  const loadNote =
    s.loadFactor === null
      ? 'No load recorded: rises are not scaled.'
      : `Scaled from ${(100 * (s.loadFraction ?? 0)).toFixed(0)} % of rated to full load: rise × (rated ÷ measured current)ⁿ, n = ${s.options.exponent}.`
  const windNote = !s.wind
    ? 'No wind recorded.'
    : s.windApplied
      ? `Wind estimate applied (×${s.wind.factor.toFixed(2)}). ${s.wind.note}`
      : `Wind estimate ×${s.wind.factor.toFixed(2)} shown, not applied. ${s.wind.note}`

  return [
    { id: 'apparent', title: 'Apparent reading', note: `As the imager reads at ε = 1, τ = 1, band ${bandText}; with the reflected and path temperatures entered.`, values: apparent },
    {
      id: 'corrected',
      title: 'Emissivity, reflection and path corrected',
      note: `Planck's law integrated over ${bandText} with ${pathParts.join(', ')}.`,
      values: corrected,
    },
    { id: 'rise', title: 'Temperature rises', note: 'Corrected hot spot minus corrected reference, and minus ambient air.', values: riseValues('measured', s.measured, s.measuredIntervals) },
    {
      id: 'load',
      title: 'Scaled to full load',
      note: loadNote,
      values: [
        ...(s.loadFraction === null ? [] : [{ key: 'loadFraction', label: 'Load', kind: 'percent' as const, value: 100 * s.loadFraction }]),
        ...(s.loadFactor === null ? [] : [{ key: 'loadFactor', label: 'Scale factor', kind: 'factor' as const, value: s.loadFactor }]),
      ],
    },
    {
      id: 'wind',
      title: 'Wind',
      note: windNote,
      values: s.wind
        ? [
            { key: 'windSpeed', label: 'Wind speed', kind: 'speed', value: r.windMs ?? null },
            { key: 'windFactor', label: 'Wind multiplier (estimate)', kind: 'factor', value: s.wind.factor },
          ]
        : [],
    },
    {
      id: 'band',
      title: 'Band',
      note: `Ranked against ${s.criteria.name} (version ${s.criteria.version}).`,
      values: [
        ...riseValues('ranked', s.ranked, s.rankedIntervals),
        { key: 'band', label: 'Band', kind: 'text', value: s.rank.band === null ? 'Not ranked' : `Band ${s.rank.band}` },
        { key: 'action', label: 'Recommended action', kind: 'text', value: s.rank.action },
        { key: 'deadline', label: 'Repair within', kind: 'days', value: s.rank.repairDeadlineDays },
      ],
    },
  ]
}
