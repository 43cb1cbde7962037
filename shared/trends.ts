// Trend of one component's rise over time: an ordinary least-squares line, Student-t quantiles, and the date the
// line is projected to cross the next band edge with a 95 % prediction-interval range (inverse prediction).
// Pure code: the server builds the trend with it and the unit tests check it against hand computations.
import type { CriteriaComparison, CriteriaSet } from './thermal/criteria'

export interface XY { x: number; y: number }

/** An ordinary least-squares fit y = intercept + slope·x. */
export interface LinearFit {
  n: number
  slope: number
  intercept: number
  xMean: number
  yMean: number
  /** Σ(x − x̄)². */
  sxx: number
  /** Residual standard deviation s = √(SSE / (n − 2)); 0 when n = 2. */
  residualSd: number
  /** Standard error of the slope, s / √Sxx. */
  slopeSe: number
  rSquared: number
}

/** OLS fit of y on x; null with fewer than two points or when all x are equal. */
export function fitLine(points: readonly XY[]): LinearFit | null {
  const n = points.length
  if (n < 2) return null
  const xMean = points.reduce((s, p) => s + p.x, 0) / n
  const yMean = points.reduce((s, p) => s + p.y, 0) / n
  let sxx = 0
  let sxy = 0
  let syy = 0
  for (const p of points) {
    sxx += (p.x - xMean) ** 2
    sxy += (p.x - xMean) * (p.y - yMean)
    syy += (p.y - yMean) ** 2
  }
  if (!(sxx > 0)) return null
  const slope = sxy / sxx
  const intercept = yMean - slope * xMean
  const sse = points.reduce((s, p) => s + (p.y - intercept - slope * p.x) ** 2, 0)
  const residualSd = n > 2 ? Math.sqrt(sse / (n - 2)) : 0
  return {
    n, slope, intercept, xMean, yMean, sxx, residualSd,
    slopeSe: residualSd / Math.sqrt(sxx),
    rSquared: syy > 0 ? 1 - sse / syy : 1,
  }
}

// --- Student's t distribution -------------------------------------------------------------------------------

/** ln Γ(x) for x > 0 (Lanczos approximation, g = 7, 9 terms; relative error below 1e-13). */
function logGamma(x: number): number {
  const c = [
    0.99999999999980993, 676.5203681218851, -1259.1392167224028, 771.32342877765313, -176.61502916214059,
    12.507343278686905, -0.13857109526572012, 9.9843695780195716e-6, 1.5056327351493116e-7,
  ]
  if (x < 0.5) return Math.log(Math.PI / Math.sin(Math.PI * x)) - logGamma(1 - x)
  const z = x - 1
  let a = c[0]!
  const t = z + 7.5
  for (let i = 1; i < 9; i++) a += c[i]! / (z + i)
  return 0.5 * Math.log(2 * Math.PI) + (z + 0.5) * Math.log(t) - t + Math.log(a)
}

/** Continued fraction of the incomplete beta function (modified Lentz's method). */
function betaContinuedFraction(a: number, b: number, x: number): number {
  const tiny = 1e-300
  let c = 1
  let d = 1 - ((a + b) * x) / (a + 1)
  if (Math.abs(d) < tiny) d = tiny
  d = 1 / d
  let h = d
  for (let m = 1; m <= 500; m++) {
    const m2 = 2 * m
    let aa = (m * (b - m) * x) / ((a + m2 - 1) * (a + m2))
    d = 1 + aa * d
    if (Math.abs(d) < tiny) d = tiny
    c = 1 + aa / c
    if (Math.abs(c) < tiny) c = tiny
    d = 1 / d
    h *= d * c
    aa = (-(a + m) * (a + b + m) * x) / ((a + m2) * (a + m2 + 1))
    d = 1 + aa * d
    if (Math.abs(d) < tiny) d = tiny
    c = 1 + aa / c
    if (Math.abs(c) < tiny) c = tiny
    d = 1 / d
    const del = d * c
    h *= del
    if (Math.abs(del - 1) < 1e-15) break
  }
  return h
}

/** Regularised incomplete beta function I_x(a, b). */
export function incompleteBeta(x: number, a: number, b: number): number {
  if (x <= 0) return 0
  if (x >= 1) return 1
  const front = Math.exp(logGamma(a + b) - logGamma(a) - logGamma(b) + a * Math.log(x) + b * Math.log(1 - x))
  return x < (a + 1) / (a + b + 2)
    ? (front * betaContinuedFraction(a, b, x)) / a
    : 1 - (front * betaContinuedFraction(b, a, 1 - x)) / b
}

/** P(T ≤ t) for Student's t with `df` degrees of freedom. */
export function studentTCdf(t: number, df: number): number {
  const tail = 0.5 * incompleteBeta(df / (df + t * t), df / 2, 0.5)
  return t >= 0 ? 1 - tail : tail
}

/** The p-quantile of Student's t with `df` degrees of freedom (0 < p < 1), by bisection on the CDF. */
export function studentTQuantile(p: number, df: number): number {
  if (!(p > 0 && p < 1)) throw new RangeError('p must lie strictly between 0 and 1.')
  if (!(df > 0)) throw new RangeError('The degrees of freedom must be above 0.')
  if (p < 0.5) return -studentTQuantile(1 - p, df)
  let lo = 0
  let hi = 1
  while (studentTCdf(hi, df) < p) hi *= 2
  for (let i = 0; i < 200 && hi - lo > 1e-12 * Math.max(1, hi); i++) {
    const mid = (lo + hi) / 2
    if (studentTCdf(mid, df) < p) lo = mid
    else hi = mid
  }
  return (lo + hi) / 2
}

// --- Projection -----------------------------------------------------------------------------------------------

/** Half-width of the two-sided prediction interval for one new reading at x: t·s·√(1 + 1/n + (x − x̄)²/Sxx). */
export function predictionHalfWidth(fit: LinearFit, x: number, level = 0.95): number {
  const t = studentTQuantile(1 - (1 - level) / 2, fit.n - 2)
  return t * fit.residualSd * Math.sqrt(1 + 1 / fit.n + (x - fit.xMean) ** 2 / fit.sxx)
}

/** When the fitted line reaches `edge`, and the x-range over which `edge` lies inside the prediction interval. */
export interface Crossing {
  /** x where intercept + slope·x = edge. */
  x: number
  /**
   * Inverse-prediction range: before `earliest` the upper prediction bound is still below the edge, after `latest`
   * the lower bound is above it. Both null when the slope cannot be told from zero at this level (the range is unbounded).
   */
  earliest: number | null
  latest: number | null
}

/**
 * Crossing of a band edge E. With u = x − x̄, E lies on a prediction bound where (ȳ + b·u − E)² = t²s²(1 + 1/n + u²/Sxx):
 * (b² − t²s²/Sxx)·u² + 2b(ȳ − E)·u + (ȳ − E)² − t²s²(1 + 1/n) = 0. The range is bounded only when b² > t²s²/Sxx,
 * i.e. when the slope differs from zero at this level (the classical inverse-prediction / calibration interval).
 */
export function crossingOf(fit: LinearFit, edge: number, level = 0.95): Crossing | null {
  if (fit.slope === 0 || fit.n < 3) return null
  const x = fit.xMean + (edge - fit.yMean) / fit.slope
  const t = studentTQuantile(1 - (1 - level) / 2, fit.n - 2)
  const k = t * t * fit.residualSd * fit.residualSd
  const a = fit.slope * fit.slope - k / fit.sxx
  const b = 2 * fit.slope * (fit.yMean - edge)
  const c = (fit.yMean - edge) ** 2 - k * (1 + 1 / fit.n)
  if (!(a > 0)) return { x, earliest: null, latest: null }
  const disc = Math.sqrt(Math.max(0, b * b - 4 * a * c))
  const u1 = (-b - disc) / (2 * a)
  const u2 = (-b + disc) / (2 * a)
  return { x, earliest: fit.xMean + Math.min(u1, u2), latest: fit.xMean + Math.max(u1, u2) }
}

/** One band edge of a comparison, as drawn on the chart. */
export interface BandEdge {
  value: number
  /** The band a value enters when it rises above this edge. */
  entersBand: number
  label: string
}

/** Edges of a comparison, lowest first: its minimum (band 4 or the least severe band starts) and each upper edge. */
export function bandEdges(comparison: CriteriaComparison): BandEdge[] {
  const edges: BandEdge[] = []
  const first = comparison.bands[0]
  if (first) edges.push({ value: comparison.minimum, entersBand: first.band, label: `Band ${first.band} from ${comparison.minimum} K` })
  comparison.bands.forEach((b, i) => {
    const next = comparison.bands[i + 1]
    if (b.upTo !== null && next) edges.push({ value: b.upTo, entersBand: next.band, label: `Band ${next.band} above ${b.upTo} K` })
  })
  return edges
}

export type TrendBasis = 'overReference' | 'overAmbient'
export type TrendQuantity = 'loadScaled' | 'measured'

/** One reading of a component, as stored with a finding (or a later verification reading). */
export interface TrendReading {
  id: string
  /** Calendar date of the reading, YYYY-MM-DD. */
  date: string
  source: 'finding' | 'verification'
  riseOverReferenceK: number | null
  riseOverAmbientK: number | null
  loadA: number | null
  ratedA: number | null
  band: number | null
}

export interface TrendPointOut { id: string; date: string; source: TrendReading['source']; valueK: number; band: number | null }

export type ProjectionStatus = 'projected' | 'too-few-points' | 'not-rising' | 'no-edge-above' | 'no-fit'

export interface Trend {
  basis: TrendBasis | null
  quantity: TrendQuantity
  /** Readings left out because they lack the chosen basis. */
  omitted: number
  points: TrendPointOut[]
  edges: BandEdge[]
  fit: { slopeKPerYear: number; interceptK: number; firstDate: string; residualSdK: number; rSquared: number; n: number } | null
  projection: {
    status: ProjectionStatus
    /** The edge the line is projected to cross (the next one above the latest reading). */
    edge: BandEdge | null
    date: string | null
    earliest: string | null
    latest: string | null
    level: number
    /** Student t used for the interval, with its degrees of freedom. */
    t: number | null
    df: number | null
  }
}

/** Fewest readings before a projection is shown (a line through two points has no scatter to judge it by). */
export const MIN_TREND_POINTS = 3
export const TREND_LEVEL = 0.95
/** Load exponent used to scale rises to rated current (the engine's default; reference sheet §2). */
export const TREND_LOAD_EXPONENT = 2

const DAY_MS = 86_400_000
export const dayNumber = (iso: string) => Date.UTC(Number(iso.slice(0, 4)), Number(iso.slice(5, 7)) - 1, Number(iso.slice(8, 10))) / DAY_MS
export const isoOfDay = (day: number) => new Date(Math.round(day) * DAY_MS).toISOString().slice(0, 10)

/**
 * The trend of one component: the basis most readings share (over reference preferred), load-scaled when every
 * reading of that basis has a load and a rating (otherwise the measured rises, said so), the criteria set's edges,
 * and a projection of the crossing of the next edge above the latest reading when there are at least three readings
 * and the fitted slope is positive.
 */
export function buildTrend(readings: readonly TrendReading[], criteria: CriteriaSet, opts: { level?: number } = {}): Trend {
  const level = opts.level ?? TREND_LEVEL
  const withRef = readings.filter((r) => r.riseOverReferenceK !== null)
  const withAmb = readings.filter((r) => r.riseOverAmbientK !== null)
  const basis: TrendBasis | null = withRef.length && withRef.length >= withAmb.length ? 'overReference' : withAmb.length ? 'overAmbient' : null
  const used = basis === 'overReference' ? withRef : basis === 'overAmbient' ? withAmb : []
  const quantity: TrendQuantity = used.length > 0 && used.every((r) => r.loadA && r.ratedA) ? 'loadScaled' : 'measured'
  const points = [...used]
    .sort((a, b) => (a.date < b.date ? -1 : a.date > b.date ? 1 : a.id < b.id ? -1 : 1))
    .map((r) => {
      const rise = (basis === 'overReference' ? r.riseOverReferenceK : r.riseOverAmbientK)!
      const valueK = quantity === 'loadScaled' ? rise * (r.ratedA! / r.loadA!) ** TREND_LOAD_EXPONENT : rise
      return { id: r.id, date: r.date, source: r.source, valueK, band: r.band }
    })
  const comparison = basis ? criteria[basis] : undefined
  const edges = comparison ? bandEdges(comparison) : []
  const empty = { edge: null, date: null, earliest: null, latest: null, level, t: null, df: null }
  const out: Trend = { basis, quantity, omitted: readings.length - used.length, points, edges, fit: null, projection: { status: 'no-fit', ...empty } }
  if (!points.length) return out
  const day0 = dayNumber(points[0]!.date)
  const fit = fitLine(points.map((p) => ({ x: dayNumber(p.date) - day0, y: p.valueK })))
  if (!fit) {
    out.projection.status = points.length < MIN_TREND_POINTS ? 'too-few-points' : 'no-fit'
    return out
  }
  out.fit = { slopeKPerYear: fit.slope * 365.25, interceptK: fit.intercept, firstDate: points[0]!.date, residualSdK: fit.residualSd, rSquared: fit.rSquared, n: fit.n }
  if (fit.n < MIN_TREND_POINTS) { out.projection.status = 'too-few-points'; return out }
  if (!(fit.slope > 0)) { out.projection.status = 'not-rising'; return out }
  const latest = points[points.length - 1]!.valueK
  const edge = edges.find((e) => e.value > latest) ?? null
  if (!edge) { out.projection.status = 'no-edge-above'; return out }
  const crossing = crossingOf(fit, edge.value, level)!
  const toIso = (x: number | null) => (x === null ? null : isoOfDay(day0 + x))
  out.projection = {
    status: 'projected', edge, date: toIso(crossing.x), earliest: toIso(crossing.earliest), latest: toIso(crossing.latest),
    level, t: studentTQuantile(1 - (1 - level) / 2, fit.n - 2), df: fit.n - 2,
  }
  return out
}

/** Plain words for a projection status, for the screen and the API. */
export const PROJECTION_STATUS_TEXT: Record<ProjectionStatus, string> = {
  'projected': 'Projected from a straight line through the readings.',
  'too-few-points': `No projection: at least ${MIN_TREND_POINTS} readings on different dates are needed.`,
  'not-rising': 'No projection: the fitted line is flat or falling.',
  'no-edge-above': 'No projection: the latest reading is already in the most severe band of this criteria set.',
  'no-fit': 'No projection: the readings are all on one date or lack a rise.',
}
