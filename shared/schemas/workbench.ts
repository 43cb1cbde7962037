import { z } from 'zod'
import { CRITERIA_SETS, IMAGER_BANDS, criteriaSetById, type ChainOptions, type Reading } from '../thermal/index'
import {
  deltaFromKelvin,
  deltaToKelvin,
  fromKelvin,
  fromMetres,
  temperatureSymbol,
  toKelvin,
  toMetres,
  type LengthUnit,
  type TemperatureUnit,
} from '../units'

/** The person's display units; the form shows and accepts values in these. */
export interface WorkbenchUnits {
  temperatureUnit: TemperatureUnit
  lengthUnit: LengthUnit
}

/** Imager band choice: a named band or custom edges. */
export type WorkbenchBandId = 'lwir' | 'lwir-8-14' | 'mwir' | 'custom'

/** The workbench form as typed: strings, so a half-typed number is kept as the person typed it. */
export interface WorkbenchForm {
  hot: string
  reference: string
  ambient: string
  reflected: string
  emissivity: string
  surface: string
  band: WorkbenchBandId
  bandFrom: string
  bandTo: string
  distance: string
  ifov: string
  target: string
  transmittance: string
  atmosphere: string
  windowTau: string
  windowTemp: string
  load: string
  rated: string
  exponent: string
  wind: string
  windApply: boolean
  criteria: string
  tolEmissivity: string
  tolReflected: string
  accAbs: string
  accPct: string
  calibrationDue: string
}

/** Fields holding a temperature (a point on a scale): converted °C ↔ °F. */
export const TEMPERATURE_FIELDS = ['hot', 'reference', 'ambient', 'reflected', 'atmosphere', 'windowTemp'] as const
/** Fields holding a temperature difference: K ↔ °F difference. */
export const DELTA_FIELDS = ['tolReflected', 'accAbs'] as const
/** Distance: m ↔ ft. */
export const LENGTH_FIELDS = ['distance'] as const
/** Target size: mm ↔ in. */
export const SMALL_LENGTH_FIELDS = ['target'] as const

/**
 * An example reading (°C, m, mm) shown when the page opens without one: a taped connection at 80 % of
 * rated load. Query strings and these defaults are always in °C, metres and millimetres, so a shared link
 * means the same thing to a °F reader.
 */
export const WORKBENCH_EXAMPLE: WorkbenchForm = {
  hot: '46.5',
  reference: '41.2',
  ambient: '24',
  reflected: '22',
  emissivity: '0.95',
  surface: 'vinyl-tape',
  band: 'lwir',
  bandFrom: '',
  bandTo: '',
  distance: '4',
  ifov: '1.36',
  target: '40',
  transmittance: '',
  atmosphere: '',
  windowTau: '',
  windowTemp: '',
  load: '480',
  rated: '600',
  exponent: '2',
  wind: '',
  windApply: false,
  criteria: 'neta-100-18',
  tolEmissivity: '0.02',
  tolReflected: '5',
  accAbs: '2',
  accPct: '2',
  calibrationDue: '',
}

/** An empty form (keeps the band, criteria and exponent). */
export const WORKBENCH_BLANK: WorkbenchForm = {
  ...Object.fromEntries(Object.keys(WORKBENCH_EXAMPLE).map((k) => [k, ''])),
  band: 'lwir',
  windApply: false,
  criteria: 'neta-100-18',
  exponent: '2',
} as WorkbenchForm

const MIN_K = 173.15 // −100 °C: colder is not an electrical-survey reading (a clear sky reflects around −50 °C)
const MAX_K = 2273.15 // 2000 °C

function toNumber(v: unknown): unknown {
  if (typeof v !== 'string') return v
  const t = v.trim().replace(',', '.')
  return t === '' ? undefined : Number(t)
}

const numberField = (what: string) => z.preprocess(toNumber, z.number({ error: `Enter ${what} as a number.` }).optional())

const fmt = (v: number): string => String(Number(v.toFixed(1)))

/** The workbench schema for a person's units: numbers in those units, cross-field rules, messages per field. */
export function workbenchSchema(units: WorkbenchUnits) {
  const u = units.temperatureUnit
  const tempRange = `between ${fmt(fromKelvin(MIN_K, u))} ${temperatureSymbol(u)} and ${fmt(fromKelvin(MAX_K, u))} ${temperatureSymbol(u)}`
  const inRange = (v: number | undefined) => v === undefined || (toKelvin(v, u) >= MIN_K && toKelvin(v, u) <= MAX_K)
  const temperature = (what: string) => numberField(what).refine(inRange, `Enter ${what} ${tempRange}.`)
  const between = (what: string, lo: number, hi: number, loOpen = false) =>
    numberField(what).refine(
      (v) => v === undefined || ((loOpen ? v > lo : v >= lo) && v <= hi),
      `Enter ${what} ${loOpen ? 'above' : 'from'} ${lo} ${loOpen ? 'and up to' : 'to'} ${hi}.`,
    )
  const required = <T>(v: T | undefined) => v !== undefined

  return z
    .object({
      hot: temperature('the hot-spot temperature').refine(required, 'Enter the apparent hot-spot temperature.'),
      reference: temperature('the reference temperature'),
      ambient: temperature('the ambient air temperature'),
      reflected: temperature('the reflected temperature').refine(required, 'Enter the reflected temperature (ASTM E1862).'),
      emissivity: between('the emissivity', 0.01, 1).refine(required, 'Enter the emissivity, or pick a surface.'),
      surface: z.string().max(60).optional(),
      band: z.enum(['lwir', 'lwir-8-14', 'mwir', 'custom'], { error: 'Choose the imager band.' }),
      bandFrom: between('the short band edge', 0.5, 30),
      bandTo: between('the long band edge', 0.5, 30),
      distance: between('the distance', 0, 10_000, true),
      ifov: between('the IFOV', 0, 100, true),
      target: between('the target size', 0, 100_000, true),
      transmittance: between('the atmospheric transmittance', 0, 1, true),
      atmosphere: temperature('the air temperature of the path'),
      windowTau: between('the window transmittance', 0, 1, true),
      windowTemp: temperature('the window temperature'),
      load: between('the load', 0, 1e6, true),
      rated: between('the rated current', 0, 1e6, true),
      exponent: between('the load exponent', 1, 3).refine(required, 'Enter the load exponent (usually 1.6 to 2.0).'),
      wind: between('the wind speed', 0, 60),
      windApply: z.boolean().optional(),
      criteria: z.string().refine((id) => CRITERIA_SETS.some((s) => s.id === id), 'Choose a criteria set.'),
      tolEmissivity: between('the emissivity tolerance', 0, 0.5),
      tolReflected: between('the reflected-temperature tolerance', 0, 100),
      accAbs: between('the instrument accuracy', 0, 50),
      accPct: between('the instrument accuracy', 0, 20),
      calibrationDue: z
        .string()
        .optional()
        .refine((v) => !v || /^\d{4}-\d{2}-\d{2}$/.test(v), 'Enter the date as yyyy-mm-dd.'),
    })
    .superRefine((v, ctx) => {
      if (v.band === 'custom') {
        if (v.bandFrom === undefined) ctx.addIssue({ code: 'custom', path: ['bandFrom'], message: 'Enter the short edge of the band in µm.' })
        if (v.bandTo === undefined) ctx.addIssue({ code: 'custom', path: ['bandTo'], message: 'Enter the long edge of the band in µm.' })
        if (v.bandFrom !== undefined && v.bandTo !== undefined && v.bandFrom >= v.bandTo) {
          ctx.addIssue({ code: 'custom', path: ['bandTo'], message: 'The long edge must be above the short edge.' })
        }
      }
      if ((v.load === undefined) !== (v.rated === undefined)) {
        const path = v.load === undefined ? 'load' : 'rated'
        ctx.addIssue({ code: 'custom', path: [path], message: 'Enter both the load and the rated current to scale the rise, or neither.' })
      }
      if ((v.windowTau === undefined) !== (v.windowTemp === undefined)) {
        const path = v.windowTau === undefined ? 'windowTau' : 'windowTemp'
        ctx.addIssue({ code: 'custom', path: [path], message: 'An IR window needs both its transmittance and its temperature.' })
      }
    })
}

/** Parsed workbench values (in the person's units). */
export type WorkbenchValues = z.output<ReturnType<typeof workbenchSchema>>

/** The engine's inputs (K, m, mm) from parsed values in the person's units. */
export function chainInputFrom(v: WorkbenchValues, units: WorkbenchUnits): { reading: Reading; options: ChainOptions } {
  const t = (x: number | undefined) => (x === undefined ? undefined : toKelvin(x, units.temperatureUnit))
  const band = v.band === 'custom' ? { fromUm: v.bandFrom!, toUm: v.bandTo! } : IMAGER_BANDS.find((b) => b.id === v.band)!.band
  const mmPerUnit = units.lengthUnit === 'm' ? 1 : 25.4
  const reading: Reading = {
    hotApparentK: t(v.hot)!,
    referenceApparentK: t(v.reference),
    ambientK: t(v.ambient),
    emissivity: v.emissivity!,
    reflectedK: t(v.reflected)!,
    transmittance: v.transmittance,
    atmosphereK: t(v.atmosphere),
    window: v.windowTau !== undefined && v.windowTemp !== undefined ? { transmittance: v.windowTau, tempK: t(v.windowTemp)! } : undefined,
    band,
    loadA: v.load,
    ratedA: v.rated,
    windMs: v.wind,
    distanceM: v.distance === undefined ? undefined : toMetres(v.distance, units.lengthUnit),
    ifovMrad: v.ifov,
    targetMm: v.target === undefined ? undefined : v.target * mmPerUnit,
  }
  const anyTolerance = [v.tolEmissivity, v.tolReflected, v.accAbs, v.accPct].some((x) => x !== undefined && x > 0)
  const delta = (x: number | undefined) => (x === undefined ? undefined : deltaToKelvin(x, units.temperatureUnit))
  const options: ChainOptions = {
    criteria: criteriaSetById(v.criteria),
    loadExponent: v.exponent,
    applyWindFactor: Boolean(v.windApply),
    tolerances: anyTolerance
      ? { emissivity: v.tolEmissivity, reflectedK: delta(v.tolReflected), instrument: { absoluteK: delta(v.accAbs), relativePct: v.accPct } }
      : undefined,
    calibrationDue: v.calibrationDue || undefined,
  }
  return { reading, options }
}

/** Engine field names (from ThermalInputError.field) → the form field to show the message beside. */
export const ENGINE_FIELD_TO_FORM: Record<string, keyof WorkbenchForm> = {
  apparentK: 'hot',
  reflectedK: 'reflected',
  emissivity: 'emissivity',
  transmittance: 'transmittance',
  atmosphereK: 'atmosphere',
  'window.transmittance': 'windowTau',
  'window.tempK': 'windowTemp',
  band: 'band',
  loadA: 'load',
  ratedA: 'rated',
  loadExponent: 'exponent',
  windMs: 'wind',
}

type Converter = (value: number) => number

function convertFields(form: WorkbenchForm, fields: readonly (keyof WorkbenchForm)[], fn: Converter): void {
  for (const key of fields) {
    const raw = form[key]
    if (typeof raw !== 'string' || raw.trim() === '') continue
    const n = Number(raw.trim().replace(',', '.'))
    if (!Number.isFinite(n)) continue
    // Seven significant figures: enough that m → ft → m returns the number typed, few enough to read.
    ;(form as unknown as Record<string, string>)[key] = String(Number(fn(n).toPrecision(7)))
  }
}

/** Re-expresses a form's numbers from one set of units in another (°C → °F, m → ft, …). */
export function convertForm(form: WorkbenchForm, from: WorkbenchUnits, to: WorkbenchUnits): WorkbenchForm {
  const out = { ...form }
  if (from.temperatureUnit !== to.temperatureUnit) {
    convertFields(out, TEMPERATURE_FIELDS, (x) => fromKelvin(toKelvin(x, from.temperatureUnit), to.temperatureUnit))
    convertFields(out, DELTA_FIELDS, (x) => deltaFromKelvin(deltaToKelvin(x, from.temperatureUnit), to.temperatureUnit))
  }
  if (from.lengthUnit !== to.lengthUnit) {
    convertFields(out, LENGTH_FIELDS, (x) => fromMetres(toMetres(x, from.lengthUnit), to.lengthUnit))
    const mm = (l: LengthUnit) => (l === 'm' ? 1 : 25.4)
    convertFields(out, SMALL_LENGTH_FIELDS, (x) => (x * mm(from.lengthUnit)) / mm(to.lengthUnit))
  }
  return out
}

/** The units query strings are written in. */
export const CANONICAL_UNITS: WorkbenchUnits = { temperatureUnit: 'C', lengthUnit: 'm' }

/** The URL query for a form (values in °C, m and mm; blanks left out). */
export function queryFromForm(form: WorkbenchForm, units: WorkbenchUnits): Record<string, string> {
  const canonical = convertForm(form, units, CANONICAL_UNITS)
  const q: Record<string, string> = {}
  for (const [k, v] of Object.entries(canonical)) {
    if (typeof v === 'boolean') {
      if (v) q[k] = '1'
    } else if (v.trim() !== '') q[k] = v.trim()
  }
  return q
}

/** A form from a URL query in °C, m and mm, shown in the person's units; no query gives the example. */
export function formFromQuery(query: Record<string, unknown>, units: WorkbenchUnits): WorkbenchForm {
  const keys = Object.keys(WORKBENCH_EXAMPLE) as (keyof WorkbenchForm)[]
  const present = keys.some((k) => typeof query[k] === 'string')
  const base = present ? WORKBENCH_BLANK : WORKBENCH_EXAMPLE
  const form = { ...base }
  if (present) {
    for (const k of keys) {
      const v = query[k]
      if (typeof v !== 'string') continue
      if (k === 'windApply') form.windApply = v === '1' || v === 'true'
      else if (k === 'band') form.band = (['lwir', 'lwir-8-14', 'mwir', 'custom'].includes(v) ? v : 'lwir') as WorkbenchBandId
      else (form as unknown as Record<string, string>)[k] = v.slice(0, 40)
    }
  }
  return convertForm(form, CANONICAL_UNITS, units)
}
