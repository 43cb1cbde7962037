import { createHash, randomBytes } from 'node:crypto'
import type { H3Event } from 'h3'
import { sql } from 'kysely'
import { TOKEN_PATTERN, TOKEN_PREFIX, TOKEN_RATE_PER_MINUTE, tokenCan, type TokenScope } from '#shared/api-tokens'
import type { Permission } from '#shared/permissions'

/** What the request log needs to know about a request made with a token (read by server/plugins/api-token-audit.ts). */
export interface ApiTokenAudit { tokenId: string; organisationId: string }

/** A new token secret (prefix + 32 random bytes, base64url) and the SHA-256 stored in its place. */
export function newApiTokenSecret(): { secret: string; hash: string; hint: string } {
  const secret = `${TOKEN_PREFIX}${randomBytes(32).toString('base64url')}`
  return { secret, hash: hashApiToken(secret), hint: `${secret.slice(0, TOKEN_PREFIX.length + 4)}…` }
}

/** SHA-256 (hex) of a token secret: only the hash is stored, so a database leak hands out no working token. */
export function hashApiToken(secret: string): string {
  return createHash('sha256').update(secret).digest('hex')
}

/** The secret of an `Authorization: Bearer …` header, or null when the request has no bearer header. */
export function bearerOf(event: H3Event): string | null {
  const header = getHeader(event, 'authorization')
  if (!header) return null
  const m = /^Bearer\s+(\S+)\s*$/i.exec(header)
  return m ? m[1]! : header.toLowerCase().startsWith('bearer') ? '' : null
}

function refuse(statusCode: number, statusMessage: string, message: string): never {
  throw createError({ statusCode, statusMessage, data: { message } })
}

/**
 * Resolves a token request to the organisation it belongs to. The token acts for its own organisation only: any
 * other slug in the path is 404 (revealing nothing). Its scope maps to a fixed permission set (shared/api-tokens.ts);
 * a read token makes no change whatever the permission. Each token may make TOKEN_RATE_PER_MINUTE requests a minute
 * (counted in PostgreSQL, so every app instance shares the count); beyond that 429 with Retry-After.
 */
export async function requireTokenMember(
  event: H3Event,
  secret: string,
  slug: string | null,
  opts: { permission: Permission; allowWhenReadOnly?: boolean },
): Promise<MemberContext> {
  if (!TOKEN_PATTERN.test(secret)) refuse(401, 'Invalid token', 'This API token is not valid.')
  const db = useDb()
  const row = await db.selectFrom('api_tokens as t')
    .innerJoin('organisations as o', 'o.id', 't.organisation_id')
    .innerJoin('memberships as m', (j) => j.onRef('m.organisation_id', '=', 't.organisation_id').onRef('m.user_id', '=', 't.created_by'))
    .innerJoin('users as u', 'u.id', 't.created_by')
    .select(['t.id', 't.name', 't.scope', 't.revoked_at', 'o.id as org_id', 'o.slug', 'o.name as org_name', 'o.change_seq', 'm.removed_at', 'm.created_at as member_since',
      'u.id as user_id', 'u.email', 'u.name as user_name', 'u.temperature_unit', 'u.length_unit', 'u.time_zone'])
    .where('t.token_hash', '=', hashApiToken(secret))
    .executeTakeFirst()
  if (!row) refuse(401, 'Invalid token', 'This API token is not valid.')
  // From here on the request is logged against the token, whatever the answer.
  event.context.apiTokenAudit = { tokenId: row.id, organisationId: row.org_id } satisfies ApiTokenAudit
  if (row.revoked_at) refuse(401, 'Token revoked', 'This API token has been revoked.')
  if (row.removed_at) refuse(401, 'Token ended', 'The person who created this API token is no longer a member; an owner can create a new token.')
  if (slug !== row.slug) throw notFound('Organisation')

  const window = await sql<{ count: number; retry_after: number }>`
    insert into api_token_windows (organisation_id, token_id, window_start, count)
    values (${row.org_id}, ${row.id}, date_trunc('minute', now()), 1)
    on conflict (organisation_id, token_id, window_start) do update set count = api_token_windows.count + 1
    returning count, ceil(extract(epoch from (window_start + interval '1 minute' - now())))::int as retry_after`.execute(db)
  const { count, retry_after: retryAfter } = window.rows[0]!
  if (count === 1) {
    // First request of a new minute: forget this token's old windows.
    await db.deleteFrom('api_token_windows').where('organisation_id', '=', row.org_id).where('token_id', '=', row.id)
      .where('window_start', '<', sql<Date>`date_trunc('minute', now())`).execute()
  }
  if (count > TOKEN_RATE_PER_MINUTE) {
    setResponseHeader(event, 'Retry-After', Math.max(1, retryAfter))
    refuse(429, 'Too many requests', `This API token may make ${TOKEN_RATE_PER_MINUTE} requests a minute. Wait ${Math.max(1, retryAfter)} s and try again.`)
  }

  const scope = row.scope as TokenScope
  const reads = event.method === 'GET' || event.method === 'HEAD'
  if (!tokenCan(scope, opts.permission, event.method, event.path)) {
    refuse(403, 'Forbidden', `This API token (${scope === 'read' ? 'read' : 'read and update work-order states'}) does not allow this.`)
  }
  if (!reads && !opts.allowWhenReadOnly) await assertWritable({ id: row.org_id, name: row.org_name }, 'viewer')
  return {
    // Changes made with a token are recorded under the owner who created it; the request log names the token.
    user: {
      id: row.user_id, email: row.email, name: `${row.user_name} (API token “${row.name}”)`,
      temperatureUnit: row.temperature_unit, lengthUnit: row.length_unit, timeZone: row.time_zone,
    },
    org: { id: row.org_id, slug: row.slug, name: row.org_name, changeSeq: Number(row.change_seq) },
    // A token is never more than a viewer plus its write permissions: services that look at the role see a viewer.
    member: { role: 'viewer', since: row.member_since },
    token: { id: row.id, name: row.name, scope },
  }
}
