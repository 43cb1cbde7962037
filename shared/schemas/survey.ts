import { z } from 'zod'
import { ZERO_CELSIUS_K, criteriaSetById, type ChainOptions, type Reading } from '../thermal/index'
import { isoDateSchema, notesSchema, pageSchema, pageSizeSchema, versionSchema } from './common'

// Surveys, checks and findings: one set of rules for the server and the forms. Temperatures in °C, lengths in metres.

export const SURVEY_STATES = ['planned', 'in_progress', 'submitted', 'reviewed', 'returned'] as const
export type SurveyStateName = (typeof SURVEY_STATES)[number]

/** Plain labels for survey states (our own words). */
export const SURVEY_STATE_LABELS: Record<SurveyStateName, string> = {
  planned: 'Planned',
  in_progress: 'In progress',
  submitted: 'Awaiting review',
  reviewed: 'Reviewed',
  returned: 'Returned',
}

export const CHECK_OUTCOMES = ['clear', 'finding', 'not_reached'] as const
export type CheckOutcome = (typeof CHECK_OUTCOMES)[number]

export const NOT_REACHED_REASONS = ['no_access', 'de_energised', 'outage', 'unsafe', 'other'] as const
export type NotReachedReason = (typeof NOT_REACHED_REASONS)[number]

/** Why an asset was not looked at, in plain words. */
export const NOT_REACHED_LABELS: Record<NotReachedReason, string> = {
  no_access: 'No access',
  de_energised: 'De-energised',
  outage: 'Outage',
  unsafe: 'Unsafe to approach',
  other: 'Other (say why)',
}

export const SKY_CONDITIONS = ['clear', 'partly_cloudy', 'overcast', 'rain', 'indoors'] as const

export const REFLECTED_METHODS = ['reflector', 'direct', 'estimated'] as const
/** How the reflected temperature was found (ASTM E1862 names two methods; an estimate is flagged as such). */
export const REFLECTED_METHOD_LABELS: Record<(typeof REFLECTED_METHODS)[number], string> = {
  reflector: 'Reflector (crumpled foil at ε = 1)',
  direct: 'Direct (measured the source)',
  estimated: 'Estimated',
}

export const PROBABLE_CAUSES = [
  'loose_connection', 'corroded_connection', 'overload', 'load_imbalance', 'failing_component', 'harmonics', 'induced_heating', 'other',
] as const
export const PROBABLE_CAUSE_LABELS: Record<(typeof PROBABLE_CAUSES)[number], string> = {
  loose_connection: 'Loose or under-torqued connection',
  corroded_connection: 'Corroded or oxidised contact',
  overload: 'Overload',
  load_imbalance: 'Load imbalance between phases',
  failing_component: 'Failing component',
  harmonics: 'Harmonic heating',
  induced_heating: 'Induced (eddy-current) heating',
  other: 'Other (describe)',
}

/** Most a load may exceed its rating by before it is taken as a typing slip. */
export const MAX_LOAD_MULTIPLE = 3

const uuid = (what: string) => z.uuid(`Choose ${what}.`)

export const surveyPlanSchema = z
  .object({
    plannedFor: isoDateSchema,
    thermographerId: uuid('a thermographer'),
    instrumentId: uuid('an instrument'),
    routeId: uuid('a route').nullable().optional(),
    siteIds: z.array(z.uuid('Not a site.')).max(200, 'A survey holds at most 200 sites.')
      .refine((ids) => new Set(ids).size === ids.length, 'A site appears only once in a survey.')
      .optional(),
  })
  .superRefine((v, ctx) => {
    if (!v.routeId && !v.siteIds?.length) ctx.addIssue({ code: 'custom', path: ['routeId'], message: 'Choose a route, or pick the sites to survey.' })
  })
export type SurveyPlanInput = z.input<typeof surveyPlanSchema>

export const surveyListQuerySchema = z.object({
  page: pageSchema,
  pageSize: pageSizeSchema,
  state: z.enum(SURVEY_STATES).optional(),
  from: isoDateSchema.optional(),
  to: isoDateSchema.optional(),
  thermographerId: z.uuid('Not a person.').optional(),
  sort: z.enum(['date', 'date_desc', 'state']).default('date_desc'),
})

export const surveyTodayQuerySchema = z.object({ date: isoDateSchema.optional() })

export const surveyVersionSchema = z.object({ version: versionSchema })

export const surveyReviewSchema = z
  .object({
    decision: z.enum(['reviewed', 'returned'], { error: 'Choose to mark it reviewed or return it.' }),
    comments: z.string().trim().max(4000, 'Use at most 4000 characters.').default(''),
    version: versionSchema,
  })
  .superRefine((v, ctx) => {
    if (v.decision === 'returned' && v.comments.length < 3) {
      ctx.addIssue({ code: 'custom', path: ['comments'], message: 'Say what the thermographer should look at again.' })
    }
  })

export const checkSchema = z
  .object({
    assetId: z.uuid('Not an asset.'),
    outcome: z.enum(CHECK_OUTCOMES, { error: 'Choose clear, finding or not reached.' }),
    reason: z.enum(NOT_REACHED_REASONS, { error: 'Choose why the asset was not reached.' }).nullable().optional(),
    note: notesSchema.optional(),
  })
  .superRefine((v, ctx) => {
    if (v.outcome === 'not_reached' && !v.reason) ctx.addIssue({ code: 'custom', path: ['reason'], message: 'Choose why the asset was not reached.' })
    if (v.outcome !== 'not_reached' && v.reason) ctx.addIssue({ code: 'custom', path: ['reason'], message: 'A reason is only for assets not reached.' })
    if (v.reason === 'other' && !v.note) ctx.addIssue({ code: 'custom', path: ['note'], message: 'Say why the asset was not reached.' })
  })
export type CheckInput = z.input<typeof checkSchema>

function toNumber(v: unknown): unknown {
  if (typeof v !== 'string') return v === null ? undefined : v
  const t = v.trim().replace(',', '.')
  return t === '' ? undefined : Number(t)
}
/** A number typed in a form (string) or sent as JSON (number); blank is absent. */
const num = (what: string) => z.preprocess(toNumber, z.number({ error: `Enter ${what} as a number.` }).optional())
const required = <T>(v: T | undefined) => v !== undefined
// −100 °C to 2000 °C: colder is not an electrical-survey reading; anything below −273.15 °C is physically impossible.
const temperature = (what: string) =>
  num(what)
    .refine((v) => v === undefined || v > -ZERO_CELSIUS_K, `${what[0]!.toUpperCase()}${what.slice(1)} cannot be below absolute zero (−273.15 °C).`)
    .refine((v) => v === undefined || v <= -ZERO_CELSIUS_K || (v >= -100 && v <= 2000), `Enter ${what} between −100 °C and 2000 °C.`)
const fraction = (what: string) => num(what).refine((v) => v === undefined || (v > 0 && v <= 1), `Enter ${what} above 0 and up to 1.`)
const positive = (what: string, max: number) => num(what).refine((v) => v === undefined || (v > 0 && v <= max), `Enter ${what} above 0 and up to ${max}.`)

export const findingSchema = z
  .object({
    assetId: z.uuid('Not an asset.'),
    component: z.string({ error: 'Name the component.' }).trim().min(1, 'Name the component (e.g. line-side connector).').max(120, 'Use at most 120 characters.'),
    phase: z.string().trim().max(20, 'Use at most 20 characters.').optional(),
    apparentC: temperature('the hot-spot temperature').refine(required, 'Enter the apparent hot-spot temperature.'),
    referenceC: temperature('the reference temperature'),
    ambientC: temperature('the ambient temperature'),
    emissivity: fraction('the emissivity').refine(required, 'Enter the emissivity.'),
    reflectedC: temperature('the reflected temperature').refine(required, 'Enter the reflected temperature.'),
    reflectedMethod: z.enum(REFLECTED_METHODS, { error: 'Say how the reflected temperature was found.' }),
    distanceM: positive('the distance in metres', 10_000),
    transmittance: fraction('the atmospheric transmittance'),
    windowTransmittance: fraction('the window transmittance'),
    windowC: temperature('the window temperature'),
    loadA: positive('the load in amperes', 1e6),
    ratedA: positive('the rated current in amperes', 1e6),
    windMs: num('the wind speed').refine((v) => v === undefined || (v >= 0 && v <= 60), 'Enter the wind speed from 0 to 60 m/s.'),
    probableCause: z.enum(PROBABLE_CAUSES, { error: 'Choose the probable cause.' }),
    // The surface-library entry whose ε was used, if one was picked (kept for the record).
    surfaceId: z.uuid('Choose a surface from the library.').nullable().optional(),
    // A temperature grid attached to this asset on this survey that the reading was taken from, if any.
    gridId: z.uuid('Not a temperature grid.').nullable().optional(),
    causeNotes: notesSchema.optional(),
    notes: notesSchema.optional(),
  })
  .superRefine((v, ctx) => {
    if (v.apparentC !== undefined && v.referenceC !== undefined && v.referenceC > v.apparentC) {
      ctx.addIssue({ code: 'custom', path: ['referenceC'], message: 'The reference reads hotter than the hot spot: check the two readings.' })
    }
    if ((v.loadA === undefined) !== (v.ratedA === undefined)) {
      ctx.addIssue({ code: 'custom', path: [v.loadA === undefined ? 'loadA' : 'ratedA'], message: 'Enter both the load and the rated current, or neither.' })
    }
    if (v.loadA !== undefined && v.ratedA !== undefined && v.loadA > MAX_LOAD_MULTIPLE * v.ratedA) {
      ctx.addIssue({ code: 'custom', path: ['loadA'], message: `The load is over ${MAX_LOAD_MULTIPLE} × the rated current: check both figures.` })
    }
    if ((v.windowTransmittance === undefined) !== (v.windowC === undefined)) {
      const path = v.windowTransmittance === undefined ? 'windowTransmittance' : 'windowC'
      ctx.addIssue({ code: 'custom', path: [path], message: 'An IR window needs both its transmittance and its temperature.' })
    }
    if (v.probableCause === 'other' && !v.causeNotes) ctx.addIssue({ code: 'custom', path: ['causeNotes'], message: 'Describe the probable cause.' })
  })
export type FindingInput = z.input<typeof findingSchema>
export type FindingValues = z.output<typeof findingSchema>

/** The survey's imager as the engine needs it. */
export interface FindingInstrument {
  bandFromUm: number
  bandToUm: number
  accuracyK?: number | null
  accuracyPct?: number | null
  ifovMrad?: number | null
  calibrationDue?: string | null
}

// Tolerances used for the interval when nothing better is known (reference sheet §3: ±0.02 ε; reflected ±5 K is common practice).
const DEFAULT_EMISSIVITY_TOLERANCE = 0.02
const DEFAULT_REFLECTED_TOLERANCE_K = 5

/** The engine's inputs (K, m) for a finding, with the survey's instrument, date and criteria set. */
export function findingChainInput(
  v: FindingValues,
  instrument: FindingInstrument,
  opts: { criteriaId?: string; today?: string } = {},
): { reading: Reading; options: ChainOptions } {
  const k = (c: number | undefined) => (c === undefined ? undefined : c + ZERO_CELSIUS_K)
  const reading: Reading = {
    hotApparentK: k(v.apparentC)!,
    referenceApparentK: k(v.referenceC),
    ambientK: k(v.ambientC),
    emissivity: v.emissivity!,
    reflectedK: k(v.reflectedC)!,
    transmittance: v.transmittance,
    atmosphereK: v.transmittance !== undefined ? k(v.ambientC) : undefined,
    window: v.windowTransmittance !== undefined && v.windowC !== undefined ? { transmittance: v.windowTransmittance, tempK: k(v.windowC)! } : undefined,
    band: { fromUm: instrument.bandFromUm, toUm: instrument.bandToUm },
    loadA: v.loadA,
    ratedA: v.ratedA,
    windMs: v.windMs,
    distanceM: v.distanceM,
    ifovMrad: instrument.ifovMrad ?? undefined,
  }
  const options: ChainOptions = {
    criteria: criteriaSetById(opts.criteriaId),
    tolerances: {
      emissivity: DEFAULT_EMISSIVITY_TOLERANCE,
      reflectedK: DEFAULT_REFLECTED_TOLERANCE_K,
      instrument: { absoluteK: instrument.accuracyK ?? undefined, relativePct: instrument.accuracyPct ?? undefined },
    },
    calibrationDue: instrument.calibrationDue ?? undefined,
    today: opts.today,
  }
  return { reading, options }
}

/** Engine field names (ThermalInputError.field) → the finding form field to show the message beside. */
export const FINDING_ENGINE_FIELDS: Record<string, keyof FindingValues> = {
  apparentK: 'apparentC',
  reflectedK: 'reflectedC',
  emissivity: 'emissivity',
  transmittance: 'transmittance',
  atmosphereK: 'ambientC',
  'window.transmittance': 'windowTransmittance',
  'window.tempK': 'windowC',
  loadA: 'loadA',
  ratedA: 'ratedA',
  windMs: 'windMs',
}

/** Field conditions at one site of a survey. */
export const surveyConditionsSchema = z.object({
  siteId: z.uuid('Not a site.'),
  ambientC: num('the ambient temperature').refine((v) => v === undefined || (v >= -100 && v <= 70), 'Enter the ambient temperature from −100 to 70 °C.'),
  windMs: num('the wind speed').refine((v) => v === undefined || (v >= 0 && v <= 60), 'Enter the wind speed from 0 to 60 m/s.'),
  humidityPct: num('the humidity').refine((v) => v === undefined || (v >= 0 && v <= 100), 'Enter the humidity from 0 to 100 %.'),
  sky: z.enum(SKY_CONDITIONS, { error: 'Choose the sky.' }).nullable().optional(),
  loadNotes: notesSchema.optional(),
})

export const findingListQuerySchema = z.object({
  page: pageSchema,
  pageSize: pageSizeSchema,
  band: z.coerce.number().int().min(1, 'Bands are 1 to 4.').max(4, 'Bands are 1 to 4.').optional(),
  surveyId: z.uuid('Not a survey.').optional(),
  // Filters the dashboard's links use: only open findings (not closed, not archived, on a survey handed in or
  // reviewed), one site, and the days the findings were recorded (organisation's time zone, both ends included).
  open: z.enum(['true', 'false'], { error: 'Use true or false.' }).optional(),
  /** Only findings that count in the dashboard's figures: not archived, on a survey handed in or reviewed. */
  counted: z.enum(['true', 'false'], { error: 'Use true or false.' }).optional(),
  siteId: z.uuid('Not a site.').optional(),
  from: isoDateSchema.optional(),
  to: isoDateSchema.optional(),
})
