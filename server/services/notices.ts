// Notices: in-app messages and the e-mails that go with them, both written once per person and dedupe key.
import { createHmac, timingSafeEqual } from 'node:crypto'
import { sql, type Kysely, type Transaction } from 'kysely'
import type { Database } from '~~/db/database'
import type { z } from 'zod'
import { NOTICE_KINDS, NOTICE_KIND_LABELS, isNoticeKind, type NoticeKind } from '#shared/notices'
import type { noticeListQuerySchema, noticePreferencesSchema, noticeReadSchema, outboxListQuerySchema } from '#shared/schemas/notices'
import type { NoticePage, NoticePreference, NoticeTokenInfo, OutboxPage, OutboxStateName } from '#shared/types/notices'
import { pageWindow } from './paging'
import { SAFETY_CAUTION_SHORT } from '#shared/thermal/safety'

type Db = Kysely<Database> | Transaction<Database>

export interface NotifyInput {
  organisationId: string
  /** Recipients; people who are not (or no longer) members of the organisation are skipped. */
  userIds: readonly string[]
  kind: NoticeKind
  /** One line, shown in the list and used as the e-mail subject. */
  title: string
  /** A few plain sentences. */
  body: string
  /** A path inside the app (e.g. `/orgs/lowmoor/surveys/<id>`); e-mails turn it into a full link. */
  link: string
  /** Same key for the same event: a second notify() with it adds nothing for a person who already has it. */
  dedupeKey: string
}

export interface NotifyResult {
  /** Notices newly added (people who already had this dedupe key are not counted). */
  added: number
  /** E-mails newly queued in the outbox. */
  queued: number
}

/**
 * Adds an in-app notice for each recipient and, for those who want this kind by e-mail, an outbox row.
 * Both are unique per (organisation, recipient, dedupeKey), so calling it twice never sends twice.
 * Pass a transaction to make the notice part of the change that caused it.
 */
export async function notify(db: Db, input: NotifyInput): Promise<NotifyResult> {
  const ids = [...new Set(input.userIds)].filter(Boolean)
  if (!ids.length) return { added: 0, queued: 0 }
  const recipients = await db.selectFrom('memberships as m')
    .innerJoin('users as u', 'u.id', 'm.user_id')
    .innerJoin('organisations as o', 'o.id', 'm.organisation_id')
    .leftJoin('notice_preferences as p', (j) => j.onRef('p.organisation_id', '=', 'm.organisation_id')
      .onRef('p.user_id', '=', 'm.user_id').on('p.kind', '=', input.kind))
    .select(['u.id', 'u.email', 'u.name', 'o.name as org_name', 'o.slug as org_slug', 'p.by_email'])
    .where('m.organisation_id', '=', input.organisationId)
    .where('m.user_id', 'in', ids)
    .where('m.removed_at', 'is', null)
    .execute()
  if (!recipients.length) return { added: 0, queued: 0 }
  const inserted = await db.insertInto('notices')
    .values(recipients.map((r) => ({
      organisation_id: input.organisationId, user_id: r.id, kind: input.kind,
      title: input.title, body: input.body, link: input.link, dedupe_key: input.dedupeKey,
    })))
    .onConflict((oc) => oc.columns(['organisation_id', 'user_id', 'dedupe_key']).doNothing())
    .returning('user_id')
    .execute()
  const fresh = new Set(inserted.map((r) => r.user_id))
  // No preference row means the person gets e-mail for this kind.
  const mailTo = recipients.filter((r) => fresh.has(r.id) && r.by_email !== false)
  let queued = 0
  if (mailTo.length) {
    const rows = mailTo.map((r) => {
      const mail = noticeEmail({ ...input, name: r.name, orgName: r.org_name, orgSlug: r.org_slug, userId: r.id })
      return {
        organisation_id: input.organisationId, user_id: r.id, kind: input.kind, to_address: r.email,
        subject: mail.subject, text: mail.text, html: mail.html, headers: JSON.stringify(mail.headers), dedupe_key: input.dedupeKey,
      }
    })
    const q = await db.insertInto('outbox').values(rows)
      .onConflict((oc) => oc.columns(['organisation_id', 'to_address', 'dedupe_key']).doNothing())
      .returning('id').execute()
    queued = q.length
  }
  return { added: inserted.length, queued }
}

// ---- E-mail words ----

const esc = (s: string) => s.replace(/[&<>"']/g, (c) => ({ '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;', "'": '&#39;' })[c]!)

function absolute(path: string): string {
  const base = String(useRuntimeConfig().appUrl || 'http://127.0.0.1:3000').replace(/\/$/, '')
  return /^https?:\/\//.test(path) ? path : `${base}${path.startsWith('/') ? '' : '/'}${path}`
}

/** The e-mail for one notice: plain text first, a light HTML twin, and RFC 8058 one-click unsubscribe headers. */
export function noticeEmail(p: NotifyInput & { name: string; orgName: string; orgSlug: string; userId: string }) {
  const token = signPreferenceToken({ organisationId: p.organisationId, userId: p.userId, kind: p.kind })
  const pageUrl = absolute(`/notices/unsubscribe?token=${encodeURIComponent(token)}`)
  const postUrl = absolute(`/api/notices/unsubscribe?token=${encodeURIComponent(token)}`)
  const openUrl = absolute(p.link || '/')
  const label = NOTICE_KIND_LABELS[p.kind]
  const choicesUrl = absolute(`/orgs/${p.orgSlug}/notices#email-choices`)
  const footer = [
    `You get this because e-mails for "${label}" are on for you in ${p.orgName}.`,
    `Stop these e-mails (one click, no sign-in needed): ${pageUrl}`,
    `Choose which notices reach you by e-mail: ${choicesUrl}`,
  ]
  const text = [`Hello ${p.name},`, '', p.title, '', p.body, '', `Open it in Greybody: ${openUrl}`, '', '--', ...footer].join('\n')
  const html = `<!doctype html><html><body style="font-family:Manrope,Arial,sans-serif;color:#1c1917;background:#f5f5f4;padding:24px">
<div style="max-width:520px;margin:auto;background:#fff;border-radius:12px;padding:24px">
<p>Hello ${esc(p.name)},</p>
<p style="font-weight:700;font-size:18px;margin:0 0 12px">${esc(p.title)}</p>
${p.body.split(/\n+/).map((para) => `<p style="line-height:1.5">${esc(para)}</p>`).join('\n')}
<p><a href="${esc(openUrl)}" style="display:inline-block;background:#292524;color:#fff;padding:10px 16px;border-radius:8px;text-decoration:none">Open it in Greybody</a></p>
<p style="font-size:12px;color:#57534e">You get this because e-mails for &ldquo;${esc(label)}&rdquo; are on for you in ${esc(p.orgName)}.
<a href="${esc(pageUrl)}">Stop these e-mails</a> (one click, no sign-in needed) or <a href="${esc(choicesUrl)}">choose which notices reach you</a>.</p>
</div></body></html>`
  return {
    subject: `${p.title} — ${p.orgName}`,
    text,
    html,
    headers: {
      'List-Unsubscribe': `<${postUrl}>`,
      'List-Unsubscribe-Post': 'List-Unsubscribe=One-Click',
    } as Record<string, string>,
  }
}

// ---- One-click preference tokens ----

export interface PreferenceToken { organisationId: string; userId: string; kind: NoticeKind }

function tokenSecret(): string {
  const secret = String(useRuntimeConfig().authSecret || process.env.NUXT_AUTH_SECRET || '')
  if (!secret) throw new Error('NUXT_AUTH_SECRET is not set')
  return secret
}

function sign(payload: string): string {
  return createHmac('sha256', tokenSecret()).update(`notice-preference:${payload}`).digest('base64url')
}

/** A signed, non-expiring token naming one person's e-mail preference for one kind (an unsubscribe link must keep working). */
export function signPreferenceToken(t: PreferenceToken): string {
  const payload = Buffer.from(JSON.stringify([t.organisationId, t.userId, t.kind])).toString('base64url')
  return `${payload}.${sign(payload)}`
}

/** The preference a token names, or null when it was not signed by us. */
export function readPreferenceToken(token: string | undefined | null): PreferenceToken | null {
  if (!token || typeof token !== 'string' || token.length > 600) return null
  const [payload, mac] = token.split('.')
  if (!payload || !mac) return null
  const expected = Buffer.from(sign(payload))
  const given = Buffer.from(mac)
  if (expected.length !== given.length || !timingSafeEqual(expected, given)) return null
  try {
    const [organisationId, userId, kind] = JSON.parse(Buffer.from(payload, 'base64url').toString('utf8')) as unknown[]
    if (typeof organisationId !== 'string' || typeof userId !== 'string' || !isNoticeKind(kind)) return null
    return { organisationId, userId, kind }
  } catch {
    return null
  }
}

/** Sets whether a person gets one kind of notice by e-mail in one organisation. */
export async function setEmailPreference(db: Db, t: PreferenceToken, byEmail: boolean): Promise<void> {
  await db.insertInto('notice_preferences')
    .values({ organisation_id: t.organisationId, user_id: t.userId, kind: t.kind, by_email: byEmail })
    .onConflict((oc) => oc.columns(['organisation_id', 'user_id', 'kind']).doUpdateSet({ by_email: byEmail, updated_at: sql`now()` }))
    .execute()
}

// ---- The person's own notices ----

const iso = (d: Date | string | null) => (d === null ? null : new Date(d).toISOString())

/** The signed-in person's notices in this organisation, newest first, with the unread count. */
export async function listNotices(ctx: MemberContext, q: z.output<typeof noticeListQuerySchema>): Promise<NoticePage> {
  const db = useDb()
  let query = db.selectFrom('notices').where('organisation_id', '=', ctx.org.id).where('user_id', '=', ctx.user.id)
  if (q.show === 'unread') query = query.where('read_at', 'is', null)
  const { limit, offset } = pageWindow(q.page, q.pageSize)
  const [total, unread, rows] = await Promise.all([
    query.select((eb) => eb.fn.countAll<number>().as('n')).executeTakeFirstOrThrow(),
    db.selectFrom('notices').select((eb) => eb.fn.countAll<number>().as('n'))
      .where('organisation_id', '=', ctx.org.id).where('user_id', '=', ctx.user.id).where('read_at', 'is', null).executeTakeFirstOrThrow(),
    query.selectAll().orderBy('created_at', 'desc').orderBy('id').limit(limit).offset(offset).execute(),
  ])
  return {
    items: rows.map((r) => ({
      id: r.id, kind: r.kind as NoticeKind, title: r.title, body: r.body, link: r.link, readAt: iso(r.read_at), createdAt: iso(r.created_at)!,
    })),
    total: Number(total.n),
    unread: Number(unread.n),
    page: q.page,
    pageSize: q.pageSize,
  }
}

/** Marks some (or all) of the person's own notices as read; ids of anyone else's notices change nothing. */
export async function markNoticesRead(ctx: MemberContext, input: z.output<typeof noticeReadSchema>): Promise<{ marked: number; unread: number }> {
  const db = useDb()
  let q = db.updateTable('notices').set({ read_at: new Date() })
    .where('organisation_id', '=', ctx.org.id).where('user_id', '=', ctx.user.id).where('read_at', 'is', null)
  if (!input.all) q = q.where('id', 'in', input.ids!)
  const r = await q.executeTakeFirst()
  const unread = await db.selectFrom('notices').select((eb) => eb.fn.countAll<number>().as('n'))
    .where('organisation_id', '=', ctx.org.id).where('user_id', '=', ctx.user.id).where('read_at', 'is', null).executeTakeFirstOrThrow()
  return { marked: Number(r.numUpdatedRows), unread: Number(unread.n) }
}

/** Every kind with whether this person gets it by e-mail in this organisation (yes unless they said no). */
export async function noticePreferences(db: Db, organisationId: string, userId: string): Promise<NoticePreference[]> {
  const rows = await db.selectFrom('notice_preferences').select(['kind', 'by_email'])
    .where('organisation_id', '=', organisationId).where('user_id', '=', userId).execute()
  const chosen = new Map(rows.map((r) => [r.kind, r.by_email]))
  return NOTICE_KINDS.map((kind) => ({ kind, label: NOTICE_KIND_LABELS[kind], byEmail: chosen.get(kind) ?? true }))
}

export async function saveNoticePreferences(ctx: MemberContext, input: z.output<typeof noticePreferencesSchema>): Promise<NoticePreference[]> {
  await useDb().transaction().execute(async (trx) => {
    for (const p of input.preferences) {
      await setEmailPreference(trx, { organisationId: ctx.org.id, userId: ctx.user.id, kind: p.kind }, p.byEmail)
    }
  })
  return noticePreferences(useDb(), ctx.org.id, ctx.user.id)
}

// ---- One-click links (no sign-in) ----

function badLink(): never {
  throw createError({ statusCode: 404, statusMessage: 'Not found', data: { message: 'This link is not valid. Sign in and choose your notices on the Notices page of your organisation.' } })
}

/** What a one-click link names, for its page; 404 for a token we did not sign or a person no longer a member. */
export async function tokenInfo(token: string): Promise<NoticeTokenInfo & { token: PreferenceToken }> {
  const t = readPreferenceToken(token)
  if (!t) badLink()
  const row = await useDb().selectFrom('memberships as m').innerJoin('organisations as o', 'o.id', 'm.organisation_id')
    .select(['o.name']).where('m.organisation_id', '=', t.organisationId).where('m.user_id', '=', t.userId).executeTakeFirst()
  if (!row) badLink()
  const prefs = await noticePreferences(useDb(), t.organisationId, t.userId)
  return { organisationName: row.name, kind: t.kind, label: NOTICE_KIND_LABELS[t.kind], byEmail: prefs.find((p) => p.kind === t.kind)!.byEmail, token: t }
}

/** The one-click change: turns e-mail for the token's kind off (or back on). */
export async function changeByToken(token: string, byEmail: boolean): Promise<NoticeTokenInfo> {
  const info = await tokenInfo(token)
  await setEmailPreference(useDb(), info.token, byEmail)
  return { organisationName: info.organisationName, kind: info.kind, label: info.label, byEmail }
}

// ---- The outbox, for managers ----

export async function listOutbox(ctx: MemberContext, q: z.output<typeof outboxListQuerySchema>): Promise<OutboxPage> {
  const db = useDb()
  let query = db.selectFrom('outbox').where('organisation_id', '=', ctx.org.id)
  if (q.state !== 'all') query = query.where('state', '=', q.state)
  const { limit, offset } = pageWindow(q.page, q.pageSize)
  const [total, byState, rows] = await Promise.all([
    query.select((eb) => eb.fn.countAll<number>().as('n')).executeTakeFirstOrThrow(),
    db.selectFrom('outbox').select(['state', (eb) => eb.fn.countAll<number>().as('n')])
      .where('organisation_id', '=', ctx.org.id).groupBy('state').execute(),
    query.select(['id', 'kind', 'to_address', 'subject', 'state', 'attempts', 'next_attempt_at', 'last_error', 'sent_at', 'created_at'])
      .orderBy('created_at', 'desc').orderBy('id').limit(limit).offset(offset).execute(),
  ])
  const counts: Record<OutboxStateName, number> = { waiting: 0, sending: 0, sent: 0, failed: 0 }
  for (const r of byState) counts[r.state as OutboxStateName] = Number(r.n)
  return {
    items: rows.map((r) => ({
      id: r.id, kind: r.kind, toAddress: r.to_address, subject: r.subject, state: r.state, attempts: r.attempts,
      nextAttemptAt: r.state === 'waiting' || r.state === 'sending' ? iso(r.next_attempt_at) : null,
      lastError: r.last_error, sentAt: iso(r.sent_at), createdAt: iso(r.created_at)!,
    })),
    total: Number(total.n),
    page: q.page,
    pageSize: q.pageSize,
    counts,
  }
}

// ---- Band 1 findings, the moment they are saved ----

/**
 * Tells the managers (and the thermographer who is not one) about a band 1 finding, inside the transaction
 * that saves it, so the notice exists exactly when the finding does.
 */
export async function notifyBandOneFinding(
  db: Db,
  ctx: MemberContext,
  f: { id: string; component: string; phase: string; rise_over_reference_k: number | null; rise_over_ambient_k: number | null; object_c: number },
  surveyId: string,
  assetId: string,
  how: 'recorded' | 'reviewed' = 'recorded',
): Promise<NotifyResult> {
  const where = await db.selectFrom('assets as a')
    .innerJoin('sites as si', (j) => j.onRef('si.organisation_id', '=', 'a.organisation_id').onRef('si.id', '=', 'a.site_id'))
    .select(['a.label', 'si.name as site_name'])
    .where('a.organisation_id', '=', ctx.org.id).where('a.id', '=', assetId).executeTakeFirst()
  const managers = await db.selectFrom('memberships').select('user_id')
    .where('organisation_id', '=', ctx.org.id).where('role', 'in', ['owner', 'manager']).where('removed_at', 'is', null).execute()
  const rise = f.rise_over_reference_k ?? f.rise_over_ambient_k
  const riseText = rise === null ? '' : ` Its rise is ${rise.toFixed(1)} K over ${f.rise_over_reference_k !== null ? 'the reference component' : 'ambient'}.`
  const asset = where ? `${where.label} at ${where.site_name}` : 'an asset'
  const component = `${f.component}${f.phase ? ` (phase ${f.phase})` : ''}`
  return notify(db, {
    organisationId: ctx.org.id,
    // On review, the manager who raised it knows already; the other managers and owners are told.
    userIds: managers.map((m) => m.user_id).filter((id) => how === 'recorded' || id !== ctx.user.id),
    kind: 'finding_band1',
    title: `Band 1 finding on ${asset}`,
    body: how === 'recorded'
      ? `${ctx.user.name} has just recorded a band 1 finding, the most severe band of the criteria set, on ${component} of ${asset}.${riseText} Review the reading and plan the repair.\n${SAFETY_CAUTION_SHORT}`
      : `${ctx.user.name} has corrected a finding on ${component} of ${asset} to band 1, the most severe band of the criteria set, on review.${riseText} Plan the repair.\n${SAFETY_CAUTION_SHORT}`,
    link: `/orgs/${ctx.org.slug}/surveys/${surveyId}`,
    dedupeKey: `finding_band1:${f.id}`,
  })
}
