import { cancelAtPeriodEnd } from '~~/server/services/billing-stripe'

export default defineEventHandler(async (event) => {
  const ctx = await requireMember(event, { permission: 'billing.manage', allowWhenReadOnly: true })
  return cancelAtPeriodEnd(ctx)
})
