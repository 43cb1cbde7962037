import { AsyncLocalStorage } from 'node:async_hooks'
import type { H3Event } from 'h3'
import { Kysely, PostgresDialect } from 'kysely'
import pg from 'pg'
import type { Database } from '~~/db/database'
import { SYSTEM_SETTING, tenantReserveHook } from '~~/db/tenant-connection'
import { TENANT_SETTING } from '~~/db/tenant-wall'

// numeric columns come back as strings by default; bigint counts as numbers are safe for our sizes.
pg.types.setTypeParser(20, (v) => Number(v))

let instance: Kysely<Database> | undefined
let authInstance: Kysely<Database> | undefined
let authPool: pg.Pool | undefined

function databaseUrl(): string {
  const connectionString = useRuntimeConfig().databaseUrl || process.env.NUXT_DATABASE_URL
  if (!connectionString) throw new Error('NUXT_DATABASE_URL is not set')
  return connectionString
}

// Work started from a request that must not run as that request's organisation (the report worker, kicked by a
// request but working through every organisation's queue).
const systemScope = new AsyncLocalStorage<true>()

/**
 * What the tenant wall (db/tenant-wall.ts) lets the next connection checkout see: the organisation requireMember
 * resolved for this request, or '*' outside any organisation's request (sign-in, account and invitation routes,
 * webhooks, workers, the scheduler, and a request's own membership lookup before the organisation is known).
 */
function currentTenantSetting(): string {
  if (systemScope.getStore()) return SYSTEM_SETTING
  let event: H3Event | undefined
  try {
    event = useEvent()
  } catch {
    return SYSTEM_SETTING // not inside a request
  }
  const org = event.context.tenantOrgId
  return typeof org === 'string' && org ? org : SYSTEM_SETTING
}

/** Called by requireMember once the organisation is resolved: from then on this request's queries see only its rows. */
export function setRequestTenant(event: H3Event, organisationId: string): void {
  event.context.tenantOrgId = organisationId
}

/** Runs background work outside the request that started it, past the tenant wall (it spans organisations). */
export function runAsSystem<T>(work: () => T): T {
  return systemScope.run(true, work)
}

/** The one Kysely instance of this server process, configured from NUXT_DATABASE_URL. */
export function useDb(): Kysely<Database> {
  if (!instance) {
    const connectionString = databaseUrl()
    instance = new Kysely<Database>({
      dialect: new PostgresDialect({
        // The listener keeps an idle connection that PostgreSQL dropped (restart, failover) from ending the process.
        pool: new pg.Pool({ connectionString, max: Number(process.env.DB_POOL_MAX || 10) }).on('error', logDroppedConnection),
        // Each checkout (one query, or one whole transaction) carries the organisation of the request it serves.
        onReserveConnection: tenantReserveHook(currentTenantSetting),
      }),
    })
  }
  return instance
}

/**
 * A small pool of its own for the one lookup every request makes before it knows its organisation: the signed-in
 * person and their membership (requireUser, requireMember). Its connections are opened as system ('*') and never
 * switched, so the main pool's connections keep the organisation they last served instead of being switched to '*'
 * and back on every request (one round trip each way). Read-only use: users, memberships, organisations.
 */
export function useAuthDb(): Kysely<Database> {
  if (!authInstance) authInstance = new Kysely<Database>({ dialect: new PostgresDialect({ pool: useAuthPool() }) })
  return authInstance
}

/** The auth lookup's pool itself, for its one prepared statement (requireMember in server/utils/auth.ts). */
export function useAuthPool(): pg.Pool {
  if (!authPool) {
    authPool = new pg.Pool({ connectionString: databaseUrl(), max: Number(process.env.DB_AUTH_POOL_MAX || 4), options: `-c ${TENANT_SETTING}=${SYSTEM_SETTING}` })
      .on('error', logDroppedConnection)
  }
  return authPool
}
