import { passwordChangeSchema } from '#shared/schemas/account'
import { recordAccountEvent } from '~~/server/services/audit'

export default defineEventHandler(async (event) => {
  const user = await requireUser(event)
  const { currentPassword, newPassword } = await bodyOf(event, passwordChangeSchema)
  const row = await useDb().selectFrom('users').select('password_hash').where('id', '=', user.id).executeTakeFirstOrThrow()
  if (!(await verifyPassword(currentPassword, row.password_hash))) fieldError('currentPassword', 'That is not your current password.')
  if (currentPassword === newPassword) fieldError('newPassword', 'Choose a password different from the current one.')
  const passwordHash = await hashPassword(newPassword)
  await useDb().transaction().execute(async (trx) => {
    await trx.updateTable('users')
      .set({ password_hash: passwordHash, password_changed_at: new Date(), updated_at: new Date() })
      .where('id', '=', user.id)
      .execute()
    await recordAccountEvent(trx, { userId: user.id, email: user.email, action: 'account.password_changed' })
  })
  return { message: 'Password changed.' }
})
