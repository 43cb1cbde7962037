import { sql, type Kysely } from 'kysely'
import { inject } from 'vitest'
import { connect } from '../../db/migrator'
import type { Database } from '../../db/database'

let db: Kysely<Database> | undefined

/** A Kysely connection to the test database. */
export function testDb(): Kysely<Database> {
  db ??= connect<Database>(inject('databaseUrl'), 2)
  return db
}

/** Empties every table but the migration log, so each test file starts from nothing. */
export async function resetDatabase(): Promise<void> {
  const { rows } = await sql<{ tablename: string }>`
    select tablename from pg_tables where schemaname = 'public' and tablename not like 'kysely_%'`.execute(testDb())
  if (rows.length) await sql.raw(`truncate ${rows.map((r) => `"${r.tablename}"`).join(', ')} restart identity cascade`).execute(testDb())
}
