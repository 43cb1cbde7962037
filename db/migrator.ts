import { promises as fs } from 'node:fs'
import path from 'node:path'
import { fileURLToPath } from 'node:url'
import { FileMigrationProvider, Kysely, Migrator, PostgresDialect } from 'kysely'
import pg from 'pg'

const migrationFolder = path.join(path.dirname(fileURLToPath(import.meta.url)), 'migrations')

/**
 * Opens a Kysely instance on a connection string (scripts and tests; the app uses server/utils/db.ts). These are
 * system connections: `greybody.org = '*'` lets them past the tenant wall (db/tenant-wall.ts) on every table.
 * An idle connection dropped by a database restart is simply removed from the pool (without a listener the pool's
 * 'error' event would end the process).
 */
export function connect<T = any>(connectionString: string, max = 5): Kysely<T> {
  return new Kysely<T>({ dialect: new PostgresDialect({ pool: new pg.Pool({ connectionString, max, options: '-c greybody.org=*' }).on('error', () => undefined) }) })
}

/** Applies every pending migration under db/migrations; throws on the first failure. */
export async function migrateToLatest(db: Kysely<any>): Promise<string[]> {
  // Unordered: migrations written on parallel branches may land with earlier timestamps than ones already applied.
  const migrator = new Migrator({ db, provider: new FileMigrationProvider({ fs, path, migrationFolder }), allowUnorderedMigrations: true })
  const { error, results } = await migrator.migrateToLatest()
  if (error) throw error
  return (results ?? []).filter((r) => r.status === 'Success').map((r) => r.migrationName)
}
