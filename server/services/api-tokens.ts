// Organisation API tokens: created (the secret shown once), listed, revoked, and their request log.
import type { z } from 'zod'
import type { ApiToken, ApiTokenCreated, ApiTokenRequest, apiTokenCreateSchema, apiTokenRequestsQuerySchema } from '#shared/api-tokens'
import type { Page } from '#shared/types/programme'
import { pageWindow } from './paging'
import { record } from './audit'

function tokenQuery(orgId: string) {
  return useDb().selectFrom('api_tokens as t')
    .leftJoin('users as u', 'u.id', 't.created_by')
    .select(['t.id', 't.name', 't.scope', 't.token_hint', 't.created_at', 't.last_used_at', 't.revoked_at', 'u.name as created_by_name'])
    .where('t.organisation_id', '=', orgId)
}

type TokenQueryRow = Awaited<ReturnType<ReturnType<typeof tokenQuery>['executeTakeFirstOrThrow']>>

function toToken(r: TokenQueryRow): ApiToken {
  return {
    id: r.id, name: r.name, scope: r.scope, hint: r.token_hint, createdAt: r.created_at.toISOString(), createdBy: r.created_by_name,
    lastUsedAt: r.last_used_at?.toISOString() ?? null, revokedAt: r.revoked_at?.toISOString() ?? null,
  }
}

/** The organisation's tokens, active ones first, newest first. */
export async function listApiTokens(ctx: MemberContext): Promise<ApiToken[]> {
  const rows = await tokenQuery(ctx.org.id).orderBy('t.revoked_at', (o) => o.desc().nullsFirst()).orderBy('t.created_at', 'desc').orderBy('t.id').execute()
  return rows.map(toToken)
}

/** Creates a token; the answer carries the secret, which is never shown again (only its SHA-256 is kept). */
export async function createApiToken(ctx: MemberContext, input: z.output<typeof apiTokenCreateSchema>): Promise<ApiTokenCreated> {
  const { secret, hash, hint } = newApiTokenSecret()
  const { id } = await useDb().transaction().execute(async (trx) => {
    const created = await trx.insertInto('api_tokens').values({
      organisation_id: ctx.org.id, name: input.name, scope: input.scope, token_hash: hash, token_hint: hint, created_by: ctx.user.id,
    }).returning('id').executeTakeFirstOrThrow()
    await record(trx, { ctx, action: 'token.created', target: { kind: 'api_token', id: created.id, label: input.name }, details: { scope: input.scope, hint } })
    return created
  })
  const row = await tokenQuery(ctx.org.id).where('t.id', '=', id).executeTakeFirstOrThrow()
  return { token: toToken(row), secret }
}

/** Revokes a token at once; later requests with it are answered 401. Revoking twice changes nothing. */
export async function revokeApiToken(ctx: MemberContext, id: string): Promise<ApiToken> {
  const db = useDb()
  const found = await db.selectFrom('api_tokens').select('id').where('organisation_id', '=', ctx.org.id).where('id', '=', id).executeTakeFirst()
  if (!found) throw notFound('API token')
  await db.transaction().execute(async (trx) => {
    const revoked = await trx.updateTable('api_tokens').set({ revoked_at: new Date(), revoked_by: ctx.user.id })
      .where('organisation_id', '=', ctx.org.id).where('id', '=', id).where('revoked_at', 'is', null).returning(['name', 'scope']).executeTakeFirst()
    // Revoking twice changes nothing, so it is recorded once.
    if (revoked) await record(trx, { ctx, action: 'token.revoked', target: { kind: 'api_token', id, label: revoked.name }, details: { scope: revoked.scope } })
  })
  return toToken(await tokenQuery(ctx.org.id).where('t.id', '=', id).executeTakeFirstOrThrow())
}

/** The requests made with one token, newest first. */
export async function listApiTokenRequests(
  ctx: MemberContext, id: string, q: z.output<typeof apiTokenRequestsQuerySchema>,
): Promise<Page<ApiTokenRequest>> {
  const db = useDb()
  const found = await db.selectFrom('api_tokens').select('id').where('organisation_id', '=', ctx.org.id).where('id', '=', id).executeTakeFirst()
  if (!found) throw notFound('API token')
  const base = db.selectFrom('api_token_requests').where('organisation_id', '=', ctx.org.id).where('token_id', '=', id)
  const { limit, offset } = pageWindow(q.page, q.pageSize)
  const [count, rows] = await Promise.all([
    base.select((eb) => eb.fn.countAll<number>().as('n')).executeTakeFirstOrThrow(),
    base.select(['id', 'method', 'path', 'status', 'created_at']).orderBy('created_at', 'desc').orderBy('id', 'desc').limit(limit).offset(offset).execute(),
  ])
  return {
    items: rows.map((r) => ({ id: String(r.id), method: r.method, path: r.path, status: r.status, at: r.created_at.toISOString() })),
    total: Number(count.n), page: q.page, pageSize: q.pageSize,
  }
}
