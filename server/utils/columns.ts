/**
 * The columns to SET for a partial update: each field of `input` that is not undefined, renamed to its column.
 * Keeps API (camelCase) and database (snake_case) names apart at the service boundary.
 */
export function changedColumns<I extends object>(input: I, columns: Partial<Record<keyof I, string>>): Record<string, unknown> {
  const set: Record<string, unknown> = {}
  for (const [field, column] of Object.entries(columns) as Array<[keyof I, string]>) {
    if (input[field] !== undefined) set[column] = input[field]
  }
  return set
}
