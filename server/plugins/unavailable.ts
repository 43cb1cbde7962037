import { setResponseHeader } from 'h3'

// When PostgreSQL or object storage is out of reach (a restart, a failover, an outage), a request is answered 503 with a
// plain message and Retry-After instead of a bare 500, wherever in the handler the failure surfaced. The error is
// rewritten in Nitro's `error` hook, which runs before the error handler renders the answer; nothing was committed
// by the failed request's transaction, and the connection pool drops the broken connections by itself.
const lastLogged: Partial<Record<BackingService, number>> = {}

export default defineNitroPlugin((nitroApp) => {
  nitroApp.hooks.hook('error', (error, { event }) => {
    const service = unavailableService(error)
    if (!service || !event) return
    const mapped = serviceUnavailableError(service)
    // Mutated in place: this object is the one the error handler renders next.
    Object.assign(error, { statusCode: mapped.statusCode, statusMessage: mapped.statusMessage, message: mapped.message, data: mapped.data, unhandled: false })
    setResponseHeader(event, 'Retry-After', UNAVAILABLE_RETRY_AFTER_SECONDS)
    // One line per service and second is enough while it is away.
    const now = Date.now()
    if ((lastLogged[service] ?? 0) < now - 1000) {
      lastLogged[service] = now
      const cause = (error as { cause?: { code?: string; message?: string } }).cause
      console.warn(`[unavailable] ${service}: ${cause?.code ?? ''} ${cause?.message ?? ''} (${event.method} ${event.path.split('?')[0]})`)
    }
  })
})
