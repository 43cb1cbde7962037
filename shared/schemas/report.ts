import { z } from 'zod'

// Survey reports: the request body (ids in paths use orgIdParamsSchema).

export const reportRequestSchema = z.object({
  /** Leave images out for a small copy (e.g. to send by e-mail); on by default. */
  includeImages: z.boolean({ error: 'Choose whether to include images.' }).default(true),
})
export type ReportRequestInput = z.input<typeof reportRequestSchema>

export const memberQualificationSchema = z.object({
  qualification: z.string({ error: 'Enter the qualification, or leave it empty.' }).trim().max(300, 'Use at most 300 characters.'),
})
