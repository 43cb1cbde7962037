import { seatChangeSchema } from '#shared/schemas/billing'
import { changeSeats } from '~~/server/services/billing-stripe'

export default defineEventHandler(async (event) => {
  const ctx = await requireMember(event, { permission: 'billing.manage', allowWhenReadOnly: true })
  const { seats } = await bodyOf(event, seatChangeSchema)
  return changeSeats(ctx, seats)
})
