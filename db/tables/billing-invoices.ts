import type { ColumnType, Generated, Insertable, Selectable, Updateable } from 'kysely'

// bigint columns: server/utils/db.ts parses int8 as a JS number (minor units stay far below 2^53).
type Minor = ColumnType<number, number | string, number | string>
type Timestamp = ColumnType<Date, Date | string | null | undefined, Date | string | null>

export interface BillingInvoicesTable {
  id: Generated<string>
  organisation_id: string
  stripe_invoice_id: string
  number: string | null
  status: string
  currency: string
  total: Minor
  amount_due: Minor
  amount_paid: Minor
  billing_reason: string | null
  hosted_url: string | null
  pdf_url: string | null
  period_start: Timestamp
  period_end: Timestamp
  issued_at: ColumnType<Date, Date | string, Date | string>
  updated_at: ColumnType<Date, Date | string | undefined, Date | string>
}
export type BillingInvoice = Selectable<BillingInvoicesTable>
export type NewBillingInvoice = Insertable<BillingInvoicesTable>
export type BillingInvoiceUpdate = Updateable<BillingInvoicesTable>
