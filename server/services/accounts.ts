import { sql } from 'kysely'
import type { z } from 'zod'
import type { signUpSchema } from '#shared/schemas/account'
import { createOrganisation, organisationsOf } from './organisations'
import { acceptInvitation } from './invitations'
import { passwordResetEmail } from './emails'
import { recordAccountEvent } from './audit'

export const RESET_MINUTES = 60

function duplicateEmail(email: string): never {
  fieldError('email', `An account with ${email} already exists. Sign in, or reset your password if you forgot it.`, 409)
}

/** Creates an account and either a new organisation (as its owner) or joins the one the invitation names. */
export async function signUp(input: z.output<typeof signUpSchema>) {
  const passwordHash = await hashPassword(input.password)
  const db = useDb()
  const taken = await db.selectFrom('users').select('id').where(sql`lower(email)`, '=', input.email).executeTakeFirst()
  if (taken) duplicateEmail(input.email)
  try {
    return await db.transaction().execute(async (trx) => {
      const user = await trx.insertInto('users')
        .values({ email: input.email, name: input.name, password_hash: passwordHash })
        .returning(['id', 'email', 'name'])
        .executeTakeFirstOrThrow()
      if (input.invitationToken) {
        const joined = await acceptInvitation(trx, input.invitationToken, user)
        return { user, organisation: { slug: joined.slug, name: joined.name } }
      }
      const org = await createOrganisation(trx, input.organisationName!, user.id)
      return { user, organisation: { slug: org.slug, name: org.name } }
    })
  } catch (e) {
    // Two sign-ups racing for one address: the unique index decides, and the loser gets the same clear message.
    if ((e as { code?: string }).code === '23505') duplicateEmail(input.email)
    throw e
  }
}

/** Sends a reset link when the address has an account; the answer never reveals whether it does. */
export async function requestPasswordReset(email: string): Promise<void> {
  const db = useDb()
  const user = await db.selectFrom('users').select(['id', 'name', 'email']).where(sql`lower(email)`, '=', email).executeTakeFirst()
  if (!user) return
  const { token, hash } = newToken()
  await db.insertInto('password_resets')
    .values({ user_id: user.id, token_hash: hash, expires_at: new Date(Date.now() + RESET_MINUTES * 60_000) })
    .execute()
  const content = passwordResetEmail({ name: user.name, url: appLink(`/reset-password?token=${encodeURIComponent(token)}`), minutes: RESET_MINUTES })
  await sendMail({ to: user.email, ...content })
}

/** Sets a new password from a reset link; the link works once and every other open link dies with it. */
export async function confirmPasswordReset(token: string, password: string): Promise<{ email: string }> {
  const passwordHash = await hashPassword(password)
  return useDb().transaction().execute(async (trx) => {
    const reset = await trx.selectFrom('password_resets as r').innerJoin('users as u', 'u.id', 'r.user_id')
      .select(['r.id', 'r.user_id', 'r.expires_at', 'r.used_at', 'u.email'])
      .where('r.token_hash', '=', hashToken(token))
      .forUpdate()
      .executeTakeFirst()
    const unusable = (message: string) => createError({ statusCode: 410, statusMessage: 'Reset link unusable', data: { message } })
    if (!reset) throw unusable('This reset link is not valid. Ask for a new one.')
    if (reset.used_at) throw unusable('This reset link has already been used. Ask for a new one if you need to.')
    if (new Date(reset.expires_at).getTime() < Date.now()) throw unusable(`This reset link expired: links work for ${RESET_MINUTES} minutes. Ask for a new one.`)
    await trx.updateTable('users').set({ password_hash: passwordHash, password_changed_at: new Date(), updated_at: new Date() })
      .where('id', '=', reset.user_id).execute()
    await trx.updateTable('password_resets').set({ used_at: new Date() })
      .where('user_id', '=', reset.user_id).where('used_at', 'is', null).execute()
    await recordAccountEvent(trx, { userId: reset.user_id, email: reset.email, action: 'account.password_reset' })
    return { email: reset.email }
  })
}

/** The signed-in person's profile with their organisations. */
export async function profileOf(user: SessionUser) {
  return { ...user, organisations: await organisationsOf(useDb(), user.id) }
}
