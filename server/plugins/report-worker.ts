import { kickReportWorker } from '~~/server/services/survey-reports'

// The survey-report worker runs inside every app instance: a request kicks it on the instance that took it, and a
// slow poll lets any instance pick up jobs left waiting (or orphaned by an instance that stopped). Claims use
// `for update skip locked`, so instances never make the same report twice.
export default defineNitroPlugin((nitro) => {
  if (process.env.GREYBODY_REPORT_WORKER === 'off') return
  const every = Math.max(1000, Number(process.env.GREYBODY_REPORT_POLL_MS ?? 5000))
  const timer = setInterval(kickReportWorker, every)
  timer.unref()
  setTimeout(kickReportWorker, 1000).unref()
  nitro.hooks.hook('close', () => clearInterval(timer))
})
