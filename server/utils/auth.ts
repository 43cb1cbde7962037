import type { H3Event } from 'h3'
import { sql } from 'kysely'
import { getServerSession } from '#auth'
import { can, type Permission, type Role } from '#shared/permissions'
import { orgSlugSchema } from '#shared/schemas/organisation'
import { verifyPassword, burnPasswordCheck } from './passwords'

export interface SessionUser {
  id: string
  email: string
  name: string
  temperatureUnit: 'C' | 'F'
  lengthUnit: 'm' | 'ft'
  timeZone: string
}

export interface MemberContext {
  user: SessionUser
  org: { id: string; slug: string; name: string }
  member: { role: Role; since: Date }
  /** Set when the request came with an organisation API token instead of a session (server/utils/api-tokens.ts). */
  token?: { id: string; name: string; scope: 'read' | 'read_write' }
}

/** Checks an e-mail and password; null when either is wrong (the caller cannot tell which). */
export async function authenticate(email: string, password: string) {
  const user = await useDb()
    .selectFrom('users')
    .select(['id', 'name', 'email', 'password_hash'])
    .where(sql`lower(email)`, '=', email.toLowerCase())
    .executeTakeFirst()
  if (!user) return burnPasswordCheck(password).then(() => null)
  return (await verifyPassword(password, user.password_hash)) ? user : null
}

/** Days after sign-in when a session ends however often it was used (OWASP: absolute session timeout). */
export const SESSION_MAX_DAYS = 30

const unauthenticated = () =>
  createError({ statusCode: 401, statusMessage: 'Unauthenticated', data: { message: 'Please sign in.' } })

/** The signed-in user, read fresh from the database; 401 when there is none or the account is gone. */
export async function requireUser(event: H3Event): Promise<SessionUser> {
  if (event.context.greybodyUser) return event.context.greybodyUser as SessionUser
  const session = await getServerSession(event)
  const id = (session?.user as { id?: string } | undefined)?.id
  if (!id) throw unauthenticated()
  const row = await useDb()
    .selectFrom('users')
    .select(['id', 'email', 'name', 'temperature_unit', 'length_unit', 'time_zone', 'password_changed_at'])
    .where('id', '=', id)
    .executeTakeFirst()
  if (!row) throw unauthenticated()
  // A password change or reset ends every session opened before it (a stolen session dies with the old password).
  const authAt = Number((session as { authAt?: number }).authAt ?? 0)
  if (authAt < new Date(row.password_changed_at).getTime() - 1000) {
    throw createError({ statusCode: 401, statusMessage: 'Session ended', data: { message: 'Your password was changed, so this session has ended. Please sign in again.' } })
  }
  // Absolute lifetime: a session kept alive by daily use still ends SESSION_MAX_DAYS after its sign-in.
  if (Date.now() - authAt > SESSION_MAX_DAYS * 86_400_000) {
    throw createError({ statusCode: 401, statusMessage: 'Session ended', data: { message: `You signed in more than ${SESSION_MAX_DAYS} days ago, so this session has ended. Please sign in again.` } })
  }
  const user: SessionUser = {
    id: row.id,
    email: row.email,
    name: row.name,
    temperatureUnit: row.temperature_unit,
    lengthUnit: row.length_unit,
    timeZone: row.time_zone,
  }
  event.context.greybodyUser = user
  return user
}

/**
 * The one way a handler learns the organisation: the slug in the path, resolved against the signed-in user's
 * membership. No membership → 404 (reveals nothing); removed → 403 with a clear message; missing permission → 403.
 */
export async function requireMember(
  event: H3Event,
  // allowWhenReadOnly: for the few writes a lapsed organisation must still make (paying, exports sent as POST).
  opts: { permission: Permission; allowWhenReadOnly?: boolean },
): Promise<MemberContext> {
  // An `Authorization: Bearer` header means an API token: no session is read, and the token alone decides.
  const bearer = bearerOf(event)
  if (bearer !== null) {
    const tokenSlug = orgSlugSchema.safeParse(getRouterParam(event, 'org'))
    const ctx = await requireTokenMember(event, bearer, tokenSlug.success ? tokenSlug.data : null, opts)
    setRequestTenant(event, ctx.org.id)
    return ctx
  }
  const user = await requireUser(event)
  const slug = orgSlugSchema.safeParse(getRouterParam(event, 'org'))
  if (!slug.success) throw notFound('Organisation')
  const row = await useDb()
    .selectFrom('memberships as m')
    .innerJoin('organisations as o', 'o.id', 'm.organisation_id')
    .select(['o.id', 'o.slug', 'o.name', 'm.role', 'm.removed_at', 'm.created_at'])
    .where('o.slug', '=', slug.data)
    .where('m.user_id', '=', user.id)
    .executeTakeFirst()
  if (!row) throw notFound('Organisation')
  if (row.removed_at) {
    throw createError({
      statusCode: 403,
      statusMessage: 'No longer a member',
      data: { message: `You are no longer a member of ${row.name}. Ask one of its owners to invite you again.` },
    })
  }
  if (!can(row.role, opts.permission)) {
    throw createError({
      statusCode: 403,
      statusMessage: 'Forbidden',
      data: { message: `Your role (${row.role}) in ${row.name} does not allow this.` },
    })
  }
  // After a billing lapse the organisation is read-only: checked here, once, for every organisation route that
  // is not a read, so no write route can forget it (402 with a plain message; see server/utils/billing.ts).
  if (event.method !== 'GET' && event.method !== 'HEAD' && !opts.allowWhenReadOnly) {
    await assertWritable({ id: row.id, name: row.name }, row.role)
  }
  // Second wall: from here on every query of this request sees only this organisation's rows (server/utils/db.ts).
  setRequestTenant(event, row.id)
  return { user, org: { id: row.id, slug: row.slug, name: row.name }, member: { role: row.role, since: row.created_at } }
}

/** A 404 that names what was not found. */
export function notFound(what: string) {
  return createError({ statusCode: 404, statusMessage: 'Not found', data: { message: `${what} not found.` } })
}
