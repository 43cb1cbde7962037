import { orgIdParamsSchema } from '#shared/schemas/organisation'
import { getGridValues } from '~~/server/services/temperature-grids'

// The grid's values: width × height little-endian Float32 °C, row-major (row 0 is the top of the picture).
export default defineEventHandler(async (event) => {
  const ctx = await requireMember(event, { permission: 'surveys.view' })
  const { id } = paramsOf(event, orgIdParamsSchema)
  const { meta, bytes } = await getGridValues(ctx, id)
  setHeader(event, 'content-type', 'application/octet-stream')
  setHeader(event, 'cache-control', 'private, no-store')
  setHeader(event, 'x-grid-width', String(meta.width))
  setHeader(event, 'x-grid-height', String(meta.height))
  return Buffer.from(bytes.buffer, bytes.byteOffset, bytes.byteLength)
})
