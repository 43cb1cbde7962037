import type { ColumnType, Generated, Insertable, Selectable, Updateable } from 'kysely'

type Numeric = ColumnType<string, number | string, number | string>
type NullableNumeric = ColumnType<string | null, number | string | null | undefined, number | string | null>

export interface InstrumentsTable {
  id: Generated<string>
  organisation_id: string
  make: string
  model: string
  serial: string
  band_from_um: Numeric
  band_to_um: Numeric
  ifov_mrad: NullableNumeric
  accuracy_k: NullableNumeric
  accuracy_pct: NullableNumeric
  /** A calendar date; selected as text (YYYY-MM-DD) so no time zone shifts it. */
  calibration_due: ColumnType<Date | null, string | null | undefined, string | null>
  notes: Generated<string>
  archived_at: Date | null
  version: Generated<number>
  created_at: ColumnType<Date, never, never>
  updated_at: ColumnType<Date, Date | string | undefined, Date | string>
}
export type Instrument = Selectable<InstrumentsTable>
export type NewInstrument = Insertable<InstrumentsTable>
export type InstrumentUpdate = Updateable<InstrumentsTable>
