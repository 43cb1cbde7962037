import { standingView } from '~~/server/services/billing'

// Every member sees whether the organisation is in grace or read-only (the banner); details stay with owners.
export default defineEventHandler(async (event) => {
  const ctx = await requireMember(event, { permission: 'organisation.view' })
  return standingView(ctx)
})
