import { z } from 'zod'

/** Optional narrowing of an asset's trends to one component (and phase), as linked from a finding. */
export const trendQuerySchema = z.object({
  component: z.string().trim().max(120, 'Use at most 120 characters.').optional(),
  phase: z.string().trim().max(20, 'Use at most 20 characters.').optional(),
})
