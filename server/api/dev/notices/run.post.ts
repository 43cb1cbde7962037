// Test hook only: runs the daily notice jobs at a chosen moment and then the outbox worker, so tests can move
// the clock. Absent unless NUXT_TEST_HOOKS=1, which only the test set-up sets; production never does.
import { z } from 'zod'
import { runNoticeJobs } from '../../../services/notice-jobs'
import { drainOutbox } from '../../../services/outbox'

const schema = z.object({
  now: z.iso.datetime({ offset: true }).optional(),
  jobs: z.boolean().default(true),
  deliver: z.boolean().default(true),
  organisationIds: z.array(z.uuid()).max(100).optional(),
  // The housekeeping the scheduler's tick also does (forgetting old Idempotency-Keys).
  prune: z.boolean().default(false),
})

export default defineEventHandler(async (event) => {
  if (process.env.NUXT_TEST_HOOKS !== '1') {
    throw createError({ statusCode: 404, statusMessage: 'Not found', data: { message: 'Not found.' } })
  }
  const body = await bodyOf(event, schema)
  const db = useDb()
  const now = body.now ? new Date(body.now) : new Date()
  const jobs = body.jobs ? await runNoticeJobs(db, now, { organisationIds: body.organisationIds }) : null
  const delivered = body.deliver ? await drainOutbox(db) : null
  const pruned = body.prune ? { idempotencyKeys: await pruneIdempotencyKeys(db, now) } : null
  return { jobs, delivered, pruned }
})
