import { sql } from 'kysely'

// Load balancers and the set-up scripts poll this; it says whether PostgreSQL answers.
export default defineEventHandler(async (event) => {
  const started = performance.now()
  try {
    await sql`select 1`.execute(useDb())
    return { status: 'ok', database: 'ok', latencyMs: Math.round((performance.now() - started) * 10) / 10 }
  } catch {
    setResponseStatus(event, 503)
    return { status: 'degraded', database: 'unreachable' }
  }
})
