import { passwordChangeSchema } from '#shared/schemas/account'

export default defineEventHandler(async (event) => {
  const user = await requireUser(event)
  const { currentPassword, newPassword } = await bodyOf(event, passwordChangeSchema)
  const row = await useDb().selectFrom('users').select('password_hash').where('id', '=', user.id).executeTakeFirstOrThrow()
  if (!(await verifyPassword(currentPassword, row.password_hash))) fieldError('currentPassword', 'That is not your current password.')
  if (currentPassword === newPassword) fieldError('newPassword', 'Choose a password different from the current one.')
  await useDb().updateTable('users')
    .set({ password_hash: await hashPassword(newPassword), password_changed_at: new Date(), updated_at: new Date() })
    .where('id', '=', user.id)
    .execute()
  return { message: 'Password changed.' }
})
