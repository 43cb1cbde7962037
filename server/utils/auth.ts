import type { H3Event } from 'h3'
import { sql, type InferResult } from 'kysely'
import { can, type Permission, type Role } from '#shared/permissions'
import { orgSlugSchema } from '#shared/schemas/organisation'
import { verifyPassword, burnPasswordCheck } from './passwords'
import { readSessionClaims } from './session-token'

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
  /**
   * changeSeq: organisations.change_seq as this request read it with its membership (server/utils/org-cache.ts);
   * absent in contexts made outside a request (workers), which never reuse answers.
   */
  org: { id: string; slug: string; name: string; changeSeq?: number }
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

/** The session cookie's person and sign-in time; 401 when there is no valid session. No database read. */
async function sessionOf(event: H3Event): Promise<{ userId: string; authAt: number }> {
  const claims = await readSessionClaims(event)
  if (!claims?.sub) throw unauthenticated()
  return { userId: claims.sub, authAt: Number(claims.authAt ?? 0) }
}

// The person's columns, read fresh on every request (a changed password or a removed account counts at once).
const userColumns = ['u.id', 'u.email', 'u.name', 'u.temperature_unit', 'u.length_unit', 'u.time_zone', 'u.password_changed_at'] as const

/** The session's person as the request sees them, after the password and lifetime rules; 401 when either ends it. */
function sessionUser(
  row: { id: string; email: string; name: string; temperature_unit: 'C' | 'F'; length_unit: 'm' | 'ft'; time_zone: string; password_changed_at: Date },
  authAt: number,
): SessionUser {
  // A password change or reset ends every session opened before it (a stolen session dies with the old password).
  if (authAt < new Date(row.password_changed_at).getTime() - 1000) {
    throw createError({ statusCode: 401, statusMessage: 'Session ended', data: { message: 'Your password was changed, so this session has ended. Please sign in again.' } })
  }
  // Absolute lifetime: a session kept alive by daily use still ends SESSION_MAX_DAYS after its sign-in.
  if (Date.now() - authAt > SESSION_MAX_DAYS * 86_400_000) {
    throw createError({ statusCode: 401, statusMessage: 'Session ended', data: { message: `You signed in more than ${SESSION_MAX_DAYS} days ago, so this session has ended. Please sign in again.` } })
  }
  return {
    id: row.id,
    email: row.email,
    name: row.name,
    temperatureUnit: row.temperature_unit,
    lengthUnit: row.length_unit,
    timeZone: row.time_zone,
  }
}

/** The signed-in user, read fresh from the database; 401 when there is none or the account is gone. */
export async function requireUser(event: H3Event): Promise<SessionUser> {
  if (event.context.greybodyUser) return event.context.greybodyUser as SessionUser
  const { userId, authAt } = await sessionOf(event)
  const row = await useAuthDb().selectFrom('users as u').select(userColumns).where('u.id', '=', userId).executeTakeFirst()
  if (!row) throw unauthenticated()
  const user = sessionUser(row, authAt)
  event.context.greybodyUser = user
  return user
}

/** The person and their membership of the organisation with that slug (membership columns null when none). */
function memberQuery(userId: string, slug: string) {
  return useAuthDb().selectFrom('users as u')
    .leftJoin(
      (eb) => eb.selectFrom('memberships as m').innerJoin('organisations as o', 'o.id', 'm.organisation_id')
        .select(['m.user_id', 'o.id as org_id', 'o.slug', 'o.name as org_name', 'o.change_seq', 'm.role', 'm.removed_at', 'm.created_at as member_since'])
        .where('o.slug', '=', slug).as('mo'),
      (j) => j.onRef('mo.user_id', '=', 'u.id'),
    )
    .select(userColumns).select(['mo.org_id', 'mo.slug', 'mo.org_name', 'mo.change_seq', 'mo.role', 'mo.removed_at', 'mo.member_since'])
    .where('u.id', '=', userId)
}

let memberStatement: { text: string; order: Array<'userId' | 'slug'> } | undefined

/**
 * memberQuery, run on every organisation request: compiled once, and sent as a named (prepared) statement so that
 * PostgreSQL parses and plans it once per connection rather than on every request.
 */
async function lookupMember(userId: string, slug: string): Promise<InferResult<ReturnType<typeof memberQuery>>[number] | undefined> {
  if (!memberStatement) {
    const probe = { userId: '00000000-0000-4000-8000-000000000001', slug: '\u0000slug' }
    const compiled = memberQuery(probe.userId, probe.slug).compile()
    const order = compiled.parameters.map((p) => (p === probe.userId ? 'userId' : p === probe.slug ? 'slug' : null))
    if (order.includes(null)) throw new Error('memberQuery has a parameter other than the person and the slug')
    memberStatement = { text: compiled.sql, order: order as Array<'userId' | 'slug'> }
  }
  const values = { userId, slug }
  const result = await useAuthPool().query({ name: 'greybody_member_lookup', text: memberStatement.text, values: memberStatement.order.map((k) => values[k]) })
  return result.rows[0]
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
  const slug = orgSlugSchema.safeParse(getRouterParam(event, 'org'))
  if (!slug.success) {
    await requireUser(event)
    throw notFound('Organisation')
  }
  // The person and their membership of the organisation in one statement (the request's only lookup before its work).
  const { userId, authAt } = await sessionOf(event)
  const row = await lookupMember(userId, slug.data)
  if (!row) throw unauthenticated()
  const user = sessionUser(row, authAt)
  event.context.greybodyUser = user
  if (!row.org_id || !row.slug || !row.org_name || !row.role || !row.member_since) throw notFound('Organisation')
  const org = { id: row.org_id, slug: row.slug, name: row.org_name, changeSeq: Number(row.change_seq ?? 0) }
  if (row.removed_at) {
    throw createError({
      statusCode: 403,
      statusMessage: 'No longer a member',
      data: { message: `You are no longer a member of ${org.name}. Ask one of its owners to invite you again.` },
    })
  }
  if (!can(row.role, opts.permission)) {
    throw createError({
      statusCode: 403,
      statusMessage: 'Forbidden',
      data: { message: `Your role (${row.role}) in ${org.name} does not allow this.` },
    })
  }
  // After a billing lapse the organisation is read-only: checked here, once, for every organisation route that
  // is not a read, so no write route can forget it (402 with a plain message; see server/utils/billing.ts).
  if (event.method !== 'GET' && event.method !== 'HEAD' && !opts.allowWhenReadOnly) {
    await assertWritable(org, row.role)
  }
  // Second wall: from here on every query of this request sees only this organisation's rows (server/utils/db.ts).
  setRequestTenant(event, org.id)
  return { user, org, member: { role: row.role, since: row.member_since } }
}

/** A 404 that names what was not found. */
export function notFound(what: string) {
  return createError({ statusCode: 404, statusMessage: 'Not found', data: { message: `${what} not found.` } })
}
