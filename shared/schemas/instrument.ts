import { z } from 'zod'
import { archivedFilterSchema, boundedNumber, isoDateSchema, notesSchema, pageSchema, pageSizeSchema, searchSchema, versionSchema } from './common'

const text = (what: string, max = 80) =>
  z.string({ error: `Enter the ${what}.` }).trim().min(1, `Enter the ${what}.`).max(max, `Use at most ${max} characters.`)

const instrumentFields = z.object({
  make: text('make'),
  model: text('model'),
  serial: text('serial number', 60),
  bandFromUm: boundedNumber(0.5, 30, 'µm'),
  bandToUm: boundedNumber(0.5, 30, 'µm'),
  /** Instantaneous field of view of one detector element, in mrad. */
  ifovMrad: boundedNumber(0.01, 50, 'mrad').nullable().optional(),
  /** Stated accuracy: ± this many kelvin or ± this percentage of reading, whichever is greater. */
  accuracyK: boundedNumber(0, 20, 'K').nullable().optional(),
  accuracyPct: boundedNumber(0, 20, '%').nullable().optional(),
  calibrationDue: isoDateSchema.nullable().optional(),
  notes: notesSchema.optional(),
})

const bandOrder = (v: { bandFromUm?: number; bandToUm?: number }, ctx: z.RefinementCtx) => {
  if (v.bandFromUm !== undefined && v.bandToUm !== undefined && !(v.bandFromUm < v.bandToUm)) {
    ctx.addIssue({ code: 'custom', path: ['bandToUm'], message: 'The band must end above where it starts.' })
  }
}

export const instrumentCreateSchema = instrumentFields.superRefine(bandOrder)
export type InstrumentCreateInput = z.input<typeof instrumentCreateSchema>

// A partial update names the band edges together so the order check always sees both.
export const instrumentUpdateSchema = instrumentFields
  .partial()
  .extend({ version: versionSchema })
  .superRefine((v, ctx) => {
    if ((v.bandFromUm === undefined) !== (v.bandToUm === undefined)) {
      ctx.addIssue({ code: 'custom', path: [v.bandFromUm === undefined ? 'bandFromUm' : 'bandToUm'], message: 'Give both ends of the band.' })
    }
    bandOrder(v, ctx)
  })

export const instrumentListQuerySchema = z.object({
  page: pageSchema,
  pageSize: pageSizeSchema,
  q: searchSchema,
  status: archivedFilterSchema,
  sort: z.enum(['name', 'calibration']).default('name'),
})

export const archiveSchema = z.object({ version: versionSchema })
