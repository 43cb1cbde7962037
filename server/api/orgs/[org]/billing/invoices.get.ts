import { invoicesQuerySchema } from '#shared/schemas/billing'
import { invoicePage } from '~~/server/services/billing'

export default defineEventHandler(async (event) => {
  const ctx = await requireMember(event, { permission: 'billing.manage' })
  const { page, pageSize } = queryOf(event, invoicesQuerySchema)
  return invoicePage(ctx, page, pageSize)
})
