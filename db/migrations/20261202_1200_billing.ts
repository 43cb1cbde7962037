import { sql, type Kysely } from 'kysely'

// Frozen in time: this migration never imports application code (plan names, trial length and seats are
// written out here as they were when it was made).
export async function up(db: Kysely<any>): Promise<void> {
  // One row per organisation: its plan and the last known state of its subscription.
  await db.schema
    .createTable('organisation_billing')
    .addColumn('organisation_id', 'uuid', (c) => c.primaryKey().references('organisations.id').onDelete('cascade'))
    .addColumn('plan', 'text', (c) => c.notNull().defaultTo('trial').check(sql`plan in ('trial', 'programme', 'utility')`))
    .addColumn('billing_interval', 'text', (c) => c.check(sql`billing_interval in ('month', 'year')`))
    .addColumn('status', 'text', (c) => c.notNull().defaultTo('trialing').check(sql`status in
      ('trialing', 'active', 'past_due', 'unpaid', 'incomplete', 'incomplete_expired', 'canceled', 'paused')`))
    .addColumn('seats_paid', 'integer', (c) => c.notNull().check(sql`seats_paid >= 0`))
    .addColumn('trial_ends_at', 'timestamptz')
    .addColumn('current_period_end', 'timestamptz')
    // Start of read-only when a payment failed; cleared once paid.
    .addColumn('grace_until', 'timestamptz')
    .addColumn('cancel_at_period_end', 'boolean', (c) => c.notNull().defaultTo(false))
    .addColumn('ended_at', 'timestamptz')
    .addColumn('stripe_customer_id', 'text', (c) => c.unique())
    .addColumn('stripe_subscription_id', 'text', (c) => c.unique())
    .addColumn('synced_at', 'timestamptz')
    .addColumn('version', 'integer', (c) => c.notNull().defaultTo(1))
    .addColumn('created_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .addColumn('updated_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .execute()
  // Organisations that existed before billing start their trial from the day they were created.
  await sql`insert into organisation_billing (organisation_id, plan, status, seats_paid, trial_ends_at)
    select id, 'trial', 'trialing', 10, created_at + interval '30 days' from organisations`.execute(db)

  // Every webhook event once: the primary key makes a replay a no-op. Events may name no organisation of
  // ours (another app on the same account), so organisation_id is nullable here, unlike tenant tables.
  await db.schema
    .createTable('stripe_events')
    .addColumn('id', 'text', (c) => c.primaryKey())
    .addColumn('type', 'text', (c) => c.notNull())
    .addColumn('organisation_id', 'uuid', (c) => c.references('organisations.id').onDelete('set null'))
    .addColumn('outcome', 'text', (c) => c.notNull().check(sql`outcome in ('applied', 'ignored')`))
    .addColumn('stripe_created_at', 'timestamptz', (c) => c.notNull())
    .addColumn('received_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .execute()
  await db.schema.createIndex('stripe_events_organisation_id_idx').on('stripe_events').columns(['organisation_id', 'received_at']).execute()

  // A copy of the invoices the provider reported, so the billing page lists them without a round trip.
  await db.schema
    .createTable('billing_invoices')
    .addColumn('id', 'uuid', (c) => c.primaryKey().defaultTo(sql`gen_random_uuid()`))
    .addColumn('organisation_id', 'uuid', (c) => c.notNull().references('organisations.id').onDelete('cascade'))
    .addColumn('stripe_invoice_id', 'text', (c) => c.notNull().unique())
    .addColumn('number', 'text')
    .addColumn('status', 'text', (c) => c.notNull())
    .addColumn('currency', 'text', (c) => c.notNull())
    .addColumn('total', 'bigint', (c) => c.notNull())
    .addColumn('amount_due', 'bigint', (c) => c.notNull())
    .addColumn('amount_paid', 'bigint', (c) => c.notNull())
    .addColumn('billing_reason', 'text')
    .addColumn('hosted_url', 'text')
    .addColumn('pdf_url', 'text')
    .addColumn('period_start', 'timestamptz')
    .addColumn('period_end', 'timestamptz')
    .addColumn('issued_at', 'timestamptz', (c) => c.notNull())
    .addColumn('updated_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .addUniqueConstraint('billing_invoices_org_id_key', ['organisation_id', 'id'])
    .execute()
  await db.schema.createIndex('billing_invoices_organisation_id_idx').on('billing_invoices').columns(['organisation_id', 'issued_at']).execute()
}

export async function down(db: Kysely<any>): Promise<void> {
  for (const t of ['billing_invoices', 'stripe_events', 'organisation_billing']) await db.schema.dropTable(t).ifExists().execute()
}
