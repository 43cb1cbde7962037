import { z } from 'zod'
import { ROLES } from '../permissions'
import { emailSchema, organisationNameSchema, timeZoneSchema } from './account'
import { versionSchema } from './common'

export const roleSchema = z.enum(ROLES, { error: 'Choose a role.' })

export const orgSlugSchema = z
  .string()
  .min(1)
  .max(64)
  .regex(/^[a-z0-9][a-z0-9-]*$/, 'Not an organisation address.')

export const orgParamsSchema = z.object({ org: orgSlugSchema })
export const orgIdParamsSchema = z.object({ org: orgSlugSchema, id: z.uuid('Not a valid id.') })

export const organisationCreateSchema = z.object({ name: organisationNameSchema })
export const organisationUpdateSchema = z.object({
  name: organisationNameSchema.optional(),
  loadExponent: z.number({ error: 'Enter a number.' }).min(1.5, 'Use 1.5 to 2.0.').max(2, 'Use 1.5 to 2.0.').optional(),
  // Programme settings: trip estimates (road factor ≥ 1, since a road is never shorter than the straight line) and intervals.
  roadFactor: z.number({ error: 'Enter a number.' }).min(1, 'Use 1.0 to 3.0.').max(3, 'Use 1.0 to 3.0.').optional(),
  averageSpeedKmh: z.number({ error: 'Enter a number.' }).min(5, 'Use 5 to 150 km/h.').max(150, 'Use 5 to 150 km/h.').optional(),
  intervalMonthsNormal: z.number({ error: 'Enter a number of months.' }).int('Use whole months.').min(1, 'Use 1 to 60 months.').max(60, 'Use 1 to 60 months.').optional(),
  intervalMonthsCondition3: z.number({ error: 'Enter a number of months.' }).int('Use whole months.').min(1, 'Use 1 to 60 months.').max(60, 'Use 1 to 60 months.').optional(),
  monitorBands: z.array(z.union([z.literal(1), z.literal(2), z.literal(3), z.literal(4)], { error: 'Bands are 1 to 4.' })).max(4)
    .refine((b) => new Set(b).size === b.length, 'Each band once.').optional(),
  monitorFactor: z.number({ error: 'Enter a number.' }).gt(0, 'Use more than 0 and at most 1.').max(1, 'Use more than 0 and at most 1.').optional(),
  // A zone the server cannot use would break every date the organisation shows (dashboard, due lists).
  timeZone: timeZoneSchema.optional(),
  version: versionSchema,
})

export const invitationCreateSchema = z.object({ email: emailSchema, role: roleSchema })
export const memberRoleUpdateSchema = z.object({ role: roleSchema })
export const invitationTokenParamsSchema = z.object({ token: z.string().min(10).max(200) })
