import { Kysely, PostgresDialect } from 'kysely'
import pg from 'pg'
import type { Database } from '~~/db/database'

// numeric columns come back as strings by default; bigint counts as numbers are safe for our sizes.
pg.types.setTypeParser(20, (v) => Number(v))

let instance: Kysely<Database> | undefined

/** The one Kysely instance of this server process, configured from NUXT_DATABASE_URL. */
export function useDb(): Kysely<Database> {
  if (!instance) {
    const connectionString = useRuntimeConfig().databaseUrl || process.env.NUXT_DATABASE_URL
    if (!connectionString) throw new Error('NUXT_DATABASE_URL is not set')
    instance = new Kysely<Database>({
      dialect: new PostgresDialect({ pool: new pg.Pool({ connectionString, max: Number(process.env.DB_POOL_MAX || 10) }) }),
    })
  }
  return instance
}
