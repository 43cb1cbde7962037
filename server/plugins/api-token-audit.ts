import type { H3Event } from 'h3'
import type { ApiTokenAudit } from '../utils/api-tokens'

// Writes one row per request made with an API token, with its final status, refusals included (revoked, wrong
// organisation, scope, rate limit). Answers go through `afterResponse`; errors are answered by Nitro's error
// handler, which skips that hook, so they are logged from the `error` hook instead. Also keeps the last-used time.
async function record(event: H3Event, status: number) {
  const audit = event.context.apiTokenAudit as ApiTokenAudit | undefined
  if (!audit || event.context.apiTokenAudited) return
  event.context.apiTokenAudited = true
  const path = (event.path.split('?')[0] ?? '').slice(0, 500)
  try {
    const db = useDb()
    await db.insertInto('api_token_requests').values({
      organisation_id: audit.organisationId, token_id: audit.tokenId, method: event.method, path, status,
    }).execute()
    if (status < 400) {
      await db.updateTable('api_tokens').set({ last_used_at: new Date() })
        .where('organisation_id', '=', audit.organisationId).where('id', '=', audit.tokenId).execute()
    }
  } catch (e) {
    console.error('API token audit failed', e)
  }
}

export default defineNitroPlugin((nitroApp) => {
  nitroApp.hooks.hook('afterResponse', (event) => record(event, event.node.res.statusCode))
  nitroApp.hooks.hook('error', async (error, { event }) => {
    if (!event) return
    const status = (error as { statusCode?: number }).statusCode ?? 500
    await record(event, status)
  })
})
