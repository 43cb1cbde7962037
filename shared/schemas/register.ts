import { z } from 'zod'
import { ASSET_CLASSES, SITE_KINDS, SITE_SAFETY_FLAGS } from '../register'
import { archivedFilterSchema, notesSchema, pageSchema, pageSizeSchema, versionSchema } from './common'

// The asset register's rules, used by the forms, the API and the CSV import alike. Field schemas carry no
// defaults: zod would apply them inside .partial() too and blank what a PATCH left out.

export const siteCodeSchema = z
  .string({ error: 'Enter a site code.' })
  .trim()
  .min(1, 'Enter a site code, like LMV-01.')
  .max(32, 'Use at most 32 characters.')
  .regex(/^[A-Za-z0-9][A-Za-z0-9._/-]*$/, 'Use letters, digits, dots, dashes, slashes or underscores (no spaces), starting with a letter or digit.')

export const siteNameSchema = z.string({ error: 'Enter the site name.' }).trim().min(1, 'Enter the site name.').max(120, 'Use at most 120 characters.')
export const siteKindSchema = z.enum(SITE_KINDS, { error: 'Choose the kind of site.' })
export const latitudeSchema = z.number({ error: 'Enter the latitude in decimal degrees, like 51.5074.' })
  .min(-90, 'Latitude runs from -90 to 90 degrees.').max(90, 'Latitude runs from -90 to 90 degrees.')
export const longitudeSchema = z.number({ error: 'Enter the longitude in decimal degrees, like -0.1278.' })
  .min(-180, 'Longitude runs from -180 to 180 degrees.').max(180, 'Longitude runs from -180 to 180 degrees.')
export const voltageKvSchema = z.number({ error: 'Enter the voltage in kV, like 11 or 0.4.' })
  .gt(0, 'Use a voltage above 0 kV.').max(1200, 'Use at most 1200 kV.')
export const safetyFlagsSchema = z.array(z.enum(SITE_SAFETY_FLAGS, { error: 'Choose from the listed safety notes.' }))
  .max(SITE_SAFETY_FLAGS.length)
  .refine((flags) => new Set(flags).size === flags.length, 'Tick each safety note once.')

const siteFields = {
  code: siteCodeSchema,
  name: siteNameSchema,
  kind: siteKindSchema,
  latitude: latitudeSchema,
  longitude: longitudeSchema,
  voltageKv: voltageKvSchema.nullable(),
  accessNotes: notesSchema,
  safetyNotes: notesSchema,
  safetyFlags: safetyFlagsSchema,
}

export const siteCreateSchema = z.object({
  ...siteFields,
  voltageKv: siteFields.voltageKv.optional().transform((v) => v ?? null),
  accessNotes: notesSchema.optional().transform((v) => v ?? ''),
  safetyNotes: notesSchema.optional().transform((v) => v ?? ''),
  safetyFlags: safetyFlagsSchema.optional().transform((v) => v ?? []),
})
export type SiteCreateInput = z.input<typeof siteCreateSchema>
export type SiteValues = z.output<typeof siteCreateSchema>

export const siteUpdateSchema = z.object(siteFields).partial().extend({ version: versionSchema })
export type SiteUpdateInput = z.input<typeof siteUpdateSchema>

export const assetLabelSchema = z.string({ error: 'Enter a label.' }).trim()
  .min(1, 'Enter a label or position, like T1 or Bay 3 breaker.').max(80, 'Use at most 80 characters.')
export const assetClassSchema = z.enum(ASSET_CLASSES, { error: 'Choose the class of equipment.' })
export const makerTextSchema = z.string().trim().max(80, 'Use at most 80 characters.')
export const ratedCurrentSchema = z.number({ error: 'Enter the rated current in A, like 630.' })
  .gt(0, 'Use a current above 0 A.').max(100_000, 'Use at most 100 000 A.')
export const criticalitySchema = z.number({ error: 'Choose a criticality from 1 to 5.' })
  .int('Use a whole number from 1 to 5.').min(1, 'Use 1 (low) to 5 (highest).').max(5, 'Use 1 (low) to 5 (highest).')
export const conditionSchema = z.number({ error: 'Choose a condition from 1 to 3.' })
  .int('Use a whole number from 1 to 3.').min(1, 'Use 1 (good), 2 (fair) or 3 (poor).').max(3, 'Use 1 (good), 2 (fair) or 3 (poor).')
export const componentsSchema = z
  .array(z.string().trim().min(1, 'A component needs a name.').max(16, 'Keep each component name to 16 characters.')
    .regex(/^[^;]*$/, 'A component name cannot contain ";".'), { error: 'List the components or phases to check.' })
  .min(1, 'List at least one component or phase to check, like A, B, C.')
  .max(24, 'List at most 24 components.')
  .refine((list) => new Set(list.map((c) => c.toLowerCase())).size === list.length, 'Name each component once.')
export const intervalOverrideSchema = z.number({ error: 'Enter a whole number of months.' })
  .int('Enter a whole number of months.').min(1, 'Use 1 to 60 months.').max(60, 'Use 1 to 60 months.')

const assetFields = {
  siteId: z.uuid({ error: 'Choose a site.' }),
  label: assetLabelSchema,
  assetClass: assetClassSchema,
  manufacturer: makerTextSchema,
  model: makerTextSchema,
  voltageKv: voltageKvSchema.nullable(),
  ratedCurrentA: ratedCurrentSchema.nullable(),
  criticality: criticalitySchema,
  condition: conditionSchema,
  components: componentsSchema,
  intervalMonths: intervalOverrideSchema.nullable(),
}

export const assetCreateSchema = z.object({
  ...assetFields,
  manufacturer: makerTextSchema.optional().transform((v) => v ?? ''),
  model: makerTextSchema.optional().transform((v) => v ?? ''),
  voltageKv: assetFields.voltageKv.optional().transform((v) => v ?? null),
  ratedCurrentA: assetFields.ratedCurrentA.optional().transform((v) => v ?? null),
  criticality: criticalitySchema.optional().transform((v) => v ?? 3),
  condition: conditionSchema.optional().transform((v) => v ?? 1),
  components: componentsSchema.optional().transform((v) => v ?? ['A', 'B', 'C']),
  intervalMonths: assetFields.intervalMonths.optional().transform((v) => v ?? null),
})
export type AssetCreateInput = z.input<typeof assetCreateSchema>
export type AssetValues = z.output<typeof assetCreateSchema>

export const assetUpdateSchema = z.object(assetFields).partial().extend({ version: versionSchema })
export type AssetUpdateInput = z.input<typeof assetUpdateSchema>

/** Archive and unarchive carry the version the person saw, so that they act on what they looked at. */
export const archiveSchema = z.object({ version: versionSchema })

// Query strings: an empty parameter (`?kind=`) means "no filter", as a cleared select sends it.
function blankable<S extends z.ZodType>(schema: S) {
  return z.preprocess((v) => (v === '' || v === null ? undefined : v), schema.optional())
}
const dirSchema = blankable(z.enum(['asc', 'desc'])).transform((v) => v ?? 'asc')
const showSchema = z.preprocess((v) => (v === '' ? undefined : v), archivedFilterSchema)
const searchQuerySchema = blankable(z.string().trim().max(120, 'Use at most 120 characters.')).transform((v) => v ?? '')
/** Rows per page of the register lists. */
export const REGISTER_PAGE_SIZES = [25, 50, 100] as const
const registerPageSize = z.preprocess((v) => (v === '' ? undefined : v), pageSizeSchema)
  .refine((n) => (REGISTER_PAGE_SIZES as readonly number[]).includes(n), 'Use 25, 50 or 100 rows per page.')

// "4,5" or ["4","5"] → [4, 5]: several values of one filter.
function numberList(schema: z.ZodNumber) {
  return z.preprocess((v) => {
    if (v === undefined || v === null || v === '') return undefined
    const parts = (Array.isArray(v) ? v : String(v).split(',')).map((p) => String(p).trim()).filter(Boolean)
    return parts.map(Number)
  }, z.array(schema).max(5).optional())
}

export const SITE_SORTS = ['name', 'code', 'kind', 'voltage', 'assets', 'updated'] as const
export type SiteSort = (typeof SITE_SORTS)[number]

export const siteListQuerySchema = z.object({
  q: searchQuerySchema,
  kind: blankable(siteKindSchema),
  show: showSchema,
  sort: blankable(z.enum(SITE_SORTS)).transform((v) => v ?? 'name'),
  dir: dirSchema,
  page: z.preprocess((v) => (v === '' ? undefined : v), pageSchema),
  pageSize: registerPageSize,
})
export type SiteListQuery = z.output<typeof siteListQuerySchema>

export const ASSET_SORTS = ['label', 'site', 'class', 'criticality', 'condition', 'updated'] as const
export type AssetSort = (typeof ASSET_SORTS)[number]

/** Due-status filter of the asset list: overdue, or due within the next 30, 60 or 90 days (shared/schedule.ts). */
export const DUE_FILTERS = ['overdue', 'within-30', 'within-60', 'within-90'] as const
export type DueFilter = (typeof DUE_FILTERS)[number]

export const assetListQuerySchema = z.object({
  q: searchQuerySchema,
  site: blankable(z.uuid({ error: 'Not a site id.' })),
  class: blankable(assetClassSchema),
  criticality: numberList(criticalitySchema),
  condition: numberList(conditionSchema),
  due: blankable(z.enum(DUE_FILTERS, { error: 'Choose overdue or a 30, 60 or 90-day window.' })),
  show: showSchema,
  sort: blankable(z.enum(ASSET_SORTS)).transform((v) => v ?? 'label'),
  dir: dirSchema,
  page: z.preprocess((v) => (v === '' ? undefined : v), pageSchema),
  pageSize: registerPageSize,
})
export type AssetListQuery = z.output<typeof assetListQuerySchema>

export const exportQuerySchema = z.object({ show: showSchema })

/** The largest CSV text the import takes, in characters (about 100 000 rows of typical width). */
export const IMPORT_MAX_CHARS = 25_000_000
/** The most data rows one import takes. */
export const IMPORT_MAX_ROWS = 100_000
/** The largest piece of a file one upload request carries. */
export const IMPORT_CHUNK_MAX_CHARS = 1_000_000

export const importCreateSchema = z.object({
  kind: z.enum(['sites', 'assets'], { error: 'Choose whether the file lists sites or assets.' }),
  fileName: z.string({ error: 'The file needs a name.' }).trim().min(1, 'The file needs a name.').max(200, 'Use a file name of at most 200 characters.'),
  totalChars: z.number({ error: 'Choose a file.' }).int().min(1, 'The file is empty.')
    .max(IMPORT_MAX_CHARS, 'Files up to about 25 MB can be imported; split larger files.'),
})
export type ImportCreateInput = z.input<typeof importCreateSchema>

export const importChunkSchema = z.object({
  seq: z.number().int().min(0).max(100_000),
  text: z.string().max(IMPORT_CHUNK_MAX_CHARS, 'This piece of the file is too large.'),
})

export const importProblemsQuerySchema = z.object({
  page: z.preprocess((v) => (v === '' ? undefined : v), pageSchema),
  pageSize: registerPageSize,
})
