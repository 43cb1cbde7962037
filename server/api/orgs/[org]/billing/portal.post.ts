import { openPortal } from '~~/server/services/billing-stripe'

// Allowed while read-only: the portal is where a failed card is replaced.
export default defineEventHandler(async (event) => {
  const ctx = await requireMember(event, { permission: 'billing.manage', allowWhenReadOnly: true })
  setResponseStatus(event, 201)
  return openPortal(ctx)
})
