import { z } from 'zod'
import { GRID_LIMITS } from '../thermal/grid'

// Temperature grids: the upload (CSV text parsed on the server with the same reader the browser uses) and the
// regions a thermographer marks on it.

export const GRID_UNITS = ['C', 'F'] as const

export const gridUploadSchema = z.object({
  assetId: z.uuid('Not an asset.'),
  unit: z.enum(GRID_UNITS, { error: 'Say whether the file is in °C or °F.' }),
  fileName: z.string().trim().min(1, 'Name the file.').max(200, 'Use a file name of at most 200 characters.'),
  csv: z.string({ error: 'Attach the CSV grid.' })
    .min(1, 'The file is empty.')
    .max(GRID_LIMITS.maxChars, `The file is too large (at most ${GRID_LIMITS.maxChars.toLocaleString('en-GB')} characters).`),
})
export type GridUploadInput = z.input<typeof gridUploadSchema>

const pixel = (what: string) => z.number({ error: `Give the ${what} as a whole number of pixels.` }).int(`Give the ${what} as a whole number of pixels.`)

export const gridRegionSchema = z.object({
  shape: z.enum(['box', 'ellipse'], { error: 'A region is a box or an ellipse.' }),
  x: pixel('left edge').min(0, 'The region starts left of the grid.'),
  y: pixel('top edge').min(0, 'The region starts above the grid.'),
  w: pixel('width').min(1, 'A region is at least one pixel wide.'),
  h: pixel('height').min(1, 'A region is at least one pixel high.'),
})

export const gridRegionsSchema = z.object({
  hot: gridRegionSchema.nullable(),
  reference: gridRegionSchema.nullable(),
})
export type GridRegionsInput = z.input<typeof gridRegionsSchema>
