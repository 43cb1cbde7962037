import { z } from 'zod'
import { ROLES } from '../permissions'
import { emailSchema, organisationNameSchema } from './account'

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
  timeZone: z.string().min(1).max(64).optional(),
  version: z.number().int().positive(),
})

export const invitationCreateSchema = z.object({ email: emailSchema, role: roleSchema })
export const memberRoleUpdateSchema = z.object({ role: roleSchema })
export const invitationTokenParamsSchema = z.object({ token: z.string().min(10).max(200) })
