// The outbox worker: sends waiting e-mails over SMTP, retries with back-off, never sends a row twice.
import nodemailer, { type Transporter } from 'nodemailer'
import { sql, type Kysely } from 'kysely'
import type { Database } from '~~/db/database'
import type { OutboxRow } from '~~/db/tables/outbox'
import { OUTBOX_MAX_ATTEMPTS, afterFailure } from '#shared/notices'

/** How long a claimed row is reserved for the instance sending it; after that it is offered again (crashed sender). */
const LEASE_MS = 10 * 60_000

export interface OutboxSettings {
  maxAttempts: number
  /** Length of one back-off step (1, 2, 4 … steps); a minute in production, shorter in tests. */
  retryUnitMs: number
}

export function outboxSettings(): OutboxSettings {
  const max = Number(process.env.NUXT_OUTBOX_MAX_ATTEMPTS || OUTBOX_MAX_ATTEMPTS)
  const unit = Number(process.env.NUXT_OUTBOX_RETRY_UNIT_MS || 60_000)
  return {
    maxAttempts: Number.isInteger(max) && max > 0 ? max : OUTBOX_MAX_ATTEMPTS,
    retryUnitMs: Number.isFinite(unit) && unit > 0 ? unit : 60_000,
  }
}

let transport: Transporter | undefined

function outboxTransport(): Transporter {
  if (!transport) {
    const url = String(useRuntimeConfig().smtpUrl || process.env.NUXT_SMTP_URL || '')
    if (!url) throw new Error('NUXT_SMTP_URL is not set')
    // Short timeouts: a hung relay must fail the attempt (and be retried) well inside the lease.
    transport = nodemailer.createTransport(url, { connectionTimeout: 15_000, greetingTimeout: 15_000, socketTimeout: 60_000 } as never)
  }
  return transport
}

export type OutboxSend = (row: OutboxRow) => Promise<void>

/** Sends one outbox row; its id becomes the Message-ID so a receiving server can also spot a repeat. */
export const smtpSend: OutboxSend = async (row) => {
  await outboxTransport().sendMail({
    from: useRuntimeConfig().mailFrom,
    to: row.to_address,
    subject: row.subject,
    text: row.text,
    ...(row.html ? { html: row.html } : {}),
    headers: row.headers ?? {},
    messageId: `<outbox-${row.id}@greybody>`,
  })
}

/**
 * Claims up to `limit` rows that are due: waiting rows whose next attempt has come, and rows another sender
 * claimed but never finished (its lease ran out). `for update skip locked` means two instances scanning at the
 * same moment get different rows; the claim sets state 'sending' and pushes next_attempt_at to the lease end.
 */
export async function claimOutbox(db: Kysely<Database>, limit: number, now = new Date()): Promise<OutboxRow[]> {
  const rows = await sql<OutboxRow>`
    update outbox set state = 'sending', attempts = attempts + 1,
      next_attempt_at = ${new Date(now.getTime() + LEASE_MS)}, updated_at = now()
    where id in (
      select id from outbox
      where state in ('waiting', 'sending') and next_attempt_at <= ${now}
      order by next_attempt_at, id
      limit ${limit}
      for update skip locked)
    returning *`.execute(db)
  return rows.rows
}

export interface DeliveryResult { sent: number; retrying: number; failed: number }

/** One pass of the worker: claim due rows, send each, record the outcome. */
export async function deliverOutbox(
  db: Kysely<Database>,
  opts: { now?: Date; limit?: number; send?: OutboxSend; settings?: OutboxSettings } = {},
): Promise<DeliveryResult> {
  const settings = opts.settings ?? outboxSettings()
  const send = opts.send ?? smtpSend
  const result: DeliveryResult = { sent: 0, retrying: 0, failed: 0 }
  const rows = await claimOutbox(db, opts.limit ?? 50, opts.now ?? new Date())
  for (const row of rows) {
    try {
      await send(row)
      await db.updateTable('outbox').set({ state: 'sent', sent_at: new Date(), last_error: null, updated_at: new Date() })
        .where('id', '=', row.id).where('state', '=', 'sending').execute()
      result.sent++
    } catch (err) {
      const reason = (err instanceof Error ? err.message : String(err)).slice(0, 500) || 'unknown error'
      const next = afterFailure(row.attempts, new Date(), { maxAttempts: settings.maxAttempts, unitMs: settings.retryUnitMs })
      await db.updateTable('outbox').set({
        state: next.state, last_error: reason, updated_at: new Date(),
        ...(next.nextAttemptAt ? { next_attempt_at: next.nextAttemptAt } : {}),
      }).where('id', '=', row.id).where('state', '=', 'sending').execute()
      if (next.state === 'failed') result.failed++
      else result.retrying++
    }
  }
  return result
}

/** Delivers until nothing is due (or `maxPasses` passes ran). */
export async function drainOutbox(db: Kysely<Database>, opts: Parameters<typeof deliverOutbox>[1] & { maxPasses?: number } = {}): Promise<DeliveryResult> {
  const total: DeliveryResult = { sent: 0, retrying: 0, failed: 0 }
  for (let i = 0; i < (opts.maxPasses ?? 20); i++) {
    const r = await deliverOutbox(db, opts)
    total.sent += r.sent
    total.retrying += r.retrying
    total.failed += r.failed
    if (r.sent + r.retrying + r.failed === 0) break
  }
  return total
}
