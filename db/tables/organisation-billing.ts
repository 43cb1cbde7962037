import type { ColumnType, Generated, Insertable, Selectable, Updateable } from 'kysely'
import type { BillingInterval, PlanKey } from '../../shared/billing/plans'
import type { SubscriptionStatus } from '../../shared/billing/standing'

type Timestamp = ColumnType<Date, Date | string | null | undefined, Date | string | null>

export interface OrganisationBillingTable {
  organisation_id: string
  plan: ColumnType<PlanKey, PlanKey | undefined, PlanKey>
  billing_interval: BillingInterval | null
  status: ColumnType<SubscriptionStatus, SubscriptionStatus | undefined, SubscriptionStatus>
  seats_paid: number
  trial_ends_at: Timestamp
  current_period_end: Timestamp
  grace_until: Timestamp
  cancel_at_period_end: Generated<boolean>
  ended_at: Timestamp
  stripe_customer_id: string | null
  stripe_subscription_id: string | null
  synced_at: Timestamp
  version: Generated<number>
  created_at: ColumnType<Date, never, never>
  updated_at: ColumnType<Date, Date | string | undefined, Date | string>
}
export type OrganisationBilling = Selectable<OrganisationBillingTable>
export type NewOrganisationBilling = Insertable<OrganisationBillingTable>
export type OrganisationBillingUpdate = Updateable<OrganisationBillingTable>
