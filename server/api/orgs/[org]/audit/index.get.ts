import { auditListQuerySchema } from '#shared/audit'
import { listAudit } from '~~/server/services/audit'

// The organisation's audit log, newest first: owners only (audit.view).
export default defineEventHandler(async (event) => {
  const ctx = await requireMember(event, { permission: 'audit.view' })
  return listAudit(ctx, queryOf(event, auditListQuerySchema))
})
