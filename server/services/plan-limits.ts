// Plan limits (sites in the register; stored files) enforced where rows or files are added (409, not 403:
// a 403 on an organisation route means lost access to the client). The billing row is
// locked first so that two people adding at the same moment cannot both take the last place.
import type { Kysely, Transaction } from 'kysely'
import type { Database } from '~~/db/database'
import { PLANS, isPlanKey, type PlanKey } from '#shared/billing/plans'

type Db = Kysely<Database> | Transaction<Database>

async function lockedPlan(trx: Db, orgId: string): Promise<PlanKey> {
  const row = await trx.selectFrom('organisation_billing').select('plan')
    .where('organisation_id', '=', orgId).forUpdate().executeTakeFirst()
  return row && isPlanKey(row.plan) ? row.plan : 'trial'
}

function limitReached(message: string): never {
  throw createError({ statusCode: 409, statusMessage: 'Plan limit reached', data: { message, limit: true } })
}

/**
 * Refuses to add `adding` active sites when the plan's site limit would be passed (archived sites do not count).
 * Call inside the transaction that inserts them.
 */
export async function assertSiteRoom(trx: Db, orgId: string, adding: number): Promise<void> {
  const plan = PLANS[await lockedPlan(trx, orgId)]
  const limit = plan.limits.sites
  if (limit === null || adding <= 0) return
  const { n } = await trx.selectFrom('sites').select((eb) => eb.fn.countAll<number>().as('n'))
    .where('organisation_id', '=', orgId).where('archived_at', 'is', null).executeTakeFirstOrThrow()
  const active = Number(n)
  if (active + adding > limit) {
    const room = Math.max(0, limit - active)
    limitReached(
      `The ${plan.name} plan holds up to ${limit.toLocaleString('en-GB')} active sites; the register has ${active.toLocaleString('en-GB')}`
      + `${adding > 1 ? ` and this would add ${adding.toLocaleString('en-GB')} (room for ${room.toLocaleString('en-GB')})` : ''}. `
      + 'Archive sites you no longer inspect, or choose a larger plan on the Billing page.',
    )
  }
}

/** Bytes the plan allows in object storage; null = no limit. */
export async function storageAllowanceBytes(trx: Db, orgId: string): Promise<{ planName: string; bytes: number | null }> {
  const plan = PLANS[await lockedPlan(trx, orgId)]
  return { planName: plan.name, bytes: plan.limits.storageGb === null ? null : plan.limits.storageGb * 1024 ** 3 }
}

/** Bytes of stored files the organisation holds (images of findings and work orders). */
export async function storedBytes(db: Db, orgId: string): Promise<number> {
  const row = await db.selectFrom('attachments').select((eb) => eb.fn.coalesce(eb.fn.sum<number>('size_bytes'), eb.lit(0)).as('n'))
    .where('organisation_id', '=', orgId).where('state', '=', 'stored').executeTakeFirstOrThrow()
  return Number(row.n)
}

/** Refuses an upload that would take the organisation's stored files past the plan's allowance. */
export async function assertStorageRoom(db: Db, orgId: string, addingBytes: number): Promise<void> {
  const { planName, bytes } = await storageAllowanceBytes(db, orgId)
  if (bytes === null) return
  const used = await storedBytes(db, orgId)
  if (used + addingBytes > bytes) {
    const gb = (n: number) => `${(n / 1024 ** 3).toLocaleString('en-GB', { maximumFractionDigits: 2 })} GB`
    const message = `The ${planName} plan holds ${gb(bytes)} of files and ${gb(used)} are in use, so this file does not fit. `
      + 'Choose a larger plan on the Billing page.'
    throw createError({ statusCode: 409, statusMessage: 'Plan limit reached', data: { message, limit: true, fieldErrors: { file: [message] } } })
  }
}
