// Reminders and e-mail delivery inside the app process.
// - Scheduler (node-cron): on each tick, claims the tick in job_runs so that, with several app instances,
//   exactly one runs it; the run then sends each organisation's daily notices once per local day.
// - Outbox worker: sends waiting e-mails every few seconds (row claims with `for update skip locked`).
// Both can be switched off (NUXT_SCHEDULER=off, NUXT_OUTBOX_WORKER=off), e.g. for a web-only instance or tests.
import cron from 'node-cron'
import { INSTANCE_ID, claimRun, finishRun, pruneJobRuns, runNoticeJobs } from '../services/notice-jobs'
import { deliverOutbox } from '../services/outbox'

const TICK_JOB = 'notices-tick'
const slotOf = (key: string) => (key.startsWith(`${TICK_JOB}:`) ? key.slice(TICK_JOB.length + 1) : key)

export default defineNitroPlugin((nitroApp) => {
  const schedulerOn = (process.env.NUXT_SCHEDULER ?? 'on') !== 'off'
  const workerOn = (process.env.NUXT_OUTBOX_WORKER ?? 'on') !== 'off'
  const expression = process.env.NUXT_SCHEDULER_CRON || '5 * * * *'
  const stops: Array<() => unknown> = []
  const log = (line: string) => console.log(`[notices ${INSTANCE_ID}] ${line}`)

  if (schedulerOn) {
    if (!cron.validate(expression)) {
      console.error(`[notices] NUXT_SCHEDULER_CRON "${expression}" is not a cron expression; the scheduler is off.`)
    } else {
      const task = cron.schedule(expression, async (ctx) => {
        const db = useDb()
        const result = await runNoticeJobs(db, ctx.date)
        await pruneJobRuns(db)
        await pruneIdempotencyKeys(db, ctx.date)
        log(`finished ${TICK_JOB} ${ctx.date.toISOString()}: ${result.ran.length} organisation(s), ${result.ran.reduce((n, r) => n + r.emailsQueued, 0)} e-mail(s) queued`)
        return result
      }, {
        name: TICK_JOB,
        noOverlap: true,
        // The claim: one row per job and scheduled moment; only the instance whose insert happened runs it.
        distributed: true,
        runCoordinator: {
          // node-cron's key is "<name>:<scheduled moment ISO>"; the moment is the slot.
          shouldRun: async (key) => {
            const slot = slotOf(key)
            const won = await claimRun(useDb(), TICK_JOB, slot)
            log(won ? `claimed ${TICK_JOB} ${slot}` : `skipped ${TICK_JOB} ${slot}: claimed elsewhere`)
            return won
          },
          onComplete: (key) => finishRun(useDb(), TICK_JOB, slotOf(key)),
        },
      })
      stops.push(() => task.destroy())
      log(`scheduler on (${expression})`)
    }
  }

  if (workerOn) {
    const every = Math.max(200, Number(process.env.NUXT_OUTBOX_POLL_MS || 5000))
    let busy = false
    const timer = setInterval(async () => {
      if (busy) return
      busy = true
      try {
        const r = await deliverOutbox(useDb())
        if (r.sent || r.retrying || r.failed) log(`outbox: ${r.sent} sent, ${r.retrying} to retry, ${r.failed} failed`)
      } catch (err) {
        console.error('[notices] outbox pass failed:', (err as Error).message)
      } finally {
        busy = false
      }
    }, every)
    timer.unref()
    stops.push(() => clearInterval(timer))
  }

  nitroApp.hooks.hook('close', async () => {
    for (const stop of stops) await stop()
  })
})
