import { profileUpdateSchema } from '#shared/schemas/account'
import { profileOf } from '~~/server/services/accounts'

// Only the person themself: the row is chosen by the session's user id, never by the body.
export default defineEventHandler(async (event) => {
  const user = await requireUser(event)
  const input = await bodyOf(event, profileUpdateSchema)
  const row = await useDb().updateTable('users')
    .set({
      ...(input.name !== undefined && { name: input.name }),
      ...(input.temperatureUnit && { temperature_unit: input.temperatureUnit }),
      ...(input.lengthUnit && { length_unit: input.lengthUnit }),
      ...(input.timeZone && { time_zone: input.timeZone }),
      updated_at: new Date(),
    })
    .where('id', '=', user.id)
    .returning(['id', 'email', 'name', 'temperature_unit', 'length_unit', 'time_zone'])
    .executeTakeFirstOrThrow()
  return profileOf({
    id: row.id, email: row.email, name: row.name,
    temperatureUnit: row.temperature_unit, lengthUnit: row.length_unit, timeZone: row.time_zone,
  })
})
