import { z } from 'zod'

export const emailSchema = z
  .string({ error: 'Enter an e-mail address.' })
  .trim()
  .min(1, 'Enter an e-mail address.')
  .max(254, 'That e-mail address is too long.')
  .email('Enter a valid e-mail address, like name@example.org.')
  .transform((v) => v.toLowerCase())

// bcrypt reads at most 72 bytes, so longer passwords would be silently truncated: refuse them instead.
export const passwordSchema = z
  .string({ error: 'Enter a password.' })
  .min(10, 'Use at least 10 characters.')
  .refine((v) => new TextEncoder().encode(v).length <= 72, 'Use at most 72 bytes (about 72 plain characters).')

export const personNameSchema = z
  .string({ error: 'Enter your name.' })
  .trim()
  .min(1, 'Enter your name.')
  .max(120, 'Use at most 120 characters.')

export const organisationNameSchema = z
  .string({ error: 'Enter the organisation name.' })
  .trim()
  .min(2, 'Use at least 2 characters.')
  .max(120, 'Use at most 120 characters.')

export const signUpSchema = z.object({
  name: personNameSchema,
  email: emailSchema,
  password: passwordSchema,
  // Either a new organisation is created, or the person joins through an invitation.
  organisationName: organisationNameSchema.optional(),
  invitationToken: z.string().min(10).max(200).optional(),
}).refine((v) => v.organisationName || v.invitationToken, {
  path: ['organisationName'],
  message: 'Enter the organisation name.',
})
export type SignUpInput = z.input<typeof signUpSchema>

export const signInSchema = z.object({
  email: emailSchema,
  password: z.string().min(1, 'Enter your password.').max(200),
})

export const passwordResetRequestSchema = z.object({ email: emailSchema })

export const passwordResetConfirmSchema = z.object({
  token: z.string().min(10, 'This reset link is incomplete.').max(200),
  password: passwordSchema,
})

export const timeZoneSchema = z.string().min(1).max(64).refine((tz) => {
  try {
    new Intl.DateTimeFormat('en', { timeZone: tz })
    return true
  } catch {
    return false
  }
}, 'Choose a time zone from the list.')

export const profileUpdateSchema = z.object({
  name: personNameSchema.optional(),
  temperatureUnit: z.enum(['C', 'F'], { error: 'Choose °C or °F.' }).optional(),
  lengthUnit: z.enum(['m', 'ft'], { error: 'Choose metres or feet.' }).optional(),
  timeZone: timeZoneSchema.optional(),
})

export const passwordChangeSchema = z.object({
  currentPassword: z.string().min(1, 'Enter your current password.').max(200),
  newPassword: passwordSchema,
})
