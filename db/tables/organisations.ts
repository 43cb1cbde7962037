import type { ColumnType, Generated, Insertable, Selectable, Updateable } from 'kysely'

export interface OrganisationsTable {
  id: Generated<string>
  slug: string
  name: string
  /** Load-scaling exponent n (1.5–2.0); pg returns numeric as string. */
  load_exponent: ColumnType<string, number | string | undefined, number | string>
  time_zone: Generated<string>
  version: Generated<number>
  created_at: ColumnType<Date, never, never>
  updated_at: ColumnType<Date, Date | string | undefined, Date | string>
}
export type Organisation = Selectable<OrganisationsTable>
export type NewOrganisation = Insertable<OrganisationsTable>
export type OrganisationUpdate = Updateable<OrganisationsTable>
