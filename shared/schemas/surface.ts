import { z } from 'zod'
import { isoDateSchema, notesSchema, pageSchema, pageSizeSchema, searchSchema, versionSchema } from './common'

/** ASTM E1933 methods of measuring ε on the part itself. */
export const SURFACE_METHODS = ['contact_thermometer', 'reference_emitter'] as const
export type SurfaceMethodId = (typeof SURFACE_METHODS)[number]
export const SURFACE_METHOD_LABELS: Record<SurfaceMethodId, string> = {
  contact_thermometer: 'Contact thermometer on the surface',
  reference_emitter: 'Reference emitter (tape or paint of known ε)',
}

const surfaceFields = z.object({
  name: z.string({ error: 'Name the surface.' }).trim().min(2, 'Name the surface.').max(120, 'Use at most 120 characters.'),
  emissivity: z.number({ error: 'Enter a number.' }).min(0.01, 'Use 0.01 to 1.').max(1, 'Use 0.01 to 1.'),
  method: z.enum(SURFACE_METHODS, { error: 'Choose how ε was measured (ASTM E1933).' }),
  measuredOn: isoDateSchema.nullable().optional(),
  notes: notesSchema.optional(),
})

export const surfaceCreateSchema = surfaceFields
export type SurfaceCreateInput = z.input<typeof surfaceCreateSchema>
export const surfaceUpdateSchema = surfaceFields.partial().extend({ version: versionSchema })

export const surfaceListQuerySchema = z.object({
  page: pageSchema,
  pageSize: pageSizeSchema.default(50),
  q: searchSchema,
  kind: z.enum(['all', 'reference', 'measured']).default('all'),
  sort: z.enum(['name', 'emissivity']).default('name'),
})
