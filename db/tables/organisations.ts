import type { ColumnType, Generated, Insertable, Selectable, Updateable } from 'kysely'

export interface OrganisationsTable {
  id: Generated<string>
  slug: string
  name: string
  /** Goes up by one with every committed change to the organisation's data (migration 20261205_0200); never written by the app. */
  change_seq: ColumnType<number, never, never>
  /** Load-scaling exponent n (1.5–2.0); pg returns numeric as string. */
  load_exponent: ColumnType<string, number | string | undefined, number | string>
  time_zone: Generated<string>
  /** Road distance over great-circle distance for trip estimates (numeric, string from pg). */
  road_factor: ColumnType<string, number | string | undefined, number | string>
  average_speed_kmh: ColumnType<string, number | string | undefined, number | string>
  /** Inspection interval for condition 1–2 and for condition 3, in months (NFPA 70B 2023 Table 9.2.2 by default). */
  interval_months_normal: Generated<number>
  interval_months_condition3: Generated<number>
  /** Bands of an open finding that shorten an asset's interval, and the factor applied. */
  monitor_bands: ColumnType<number[], number[] | undefined, number[]>
  monitor_factor: ColumnType<string, number | string | undefined, number | string>
  /** Repair deadline in days per band (null = record and trend, no due date). */
  repair_days_band1: ColumnType<number | null, number | null | undefined, number | null>
  repair_days_band2: ColumnType<number | null, number | null | undefined, number | null>
  repair_days_band3: ColumnType<number | null, number | null | undefined, number | null>
  repair_days_band4: ColumnType<number | null, number | null | undefined, number | null>
  /** Last work order number handed out in this organisation. */
  work_order_counter: Generated<number>
  version: Generated<number>
  created_at: ColumnType<Date, never, never>
  updated_at: ColumnType<Date, Date | string | undefined, Date | string>
}
export type Organisation = Selectable<OrganisationsTable>
export type NewOrganisation = Insertable<OrganisationsTable>
export type OrganisationUpdate = Updateable<OrganisationsTable>
