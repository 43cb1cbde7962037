// Port and readiness helpers for the local services (loopback only).
import net from 'node:net'

/** True when nothing listens on host:port (we can bind it ourselves). */
export function isPortFree(/** @type {number} */ port, host = '127.0.0.1') {
  return new Promise((resolve) => {
    const server = net.createServer()
    server.once('error', () => resolve(false))
    server.listen({ port, host, exclusive: true }, () => server.close(() => resolve(true)))
  })
}

/** A port the OS considers free right now. */
export function anyFreePort(host = '127.0.0.1') {
  return new Promise((resolve, reject) => {
    const server = net.createServer()
    server.once('error', reject)
    server.listen(0, host, () => {
      const { port } = /** @type {net.AddressInfo} */ (server.address())
      server.close(() => resolve(port))
    })
  })
}

/**
 * First free port among the candidates (skipping ones already handed out), else any free port.
 * @param {(number | undefined | null)[]} candidates
 * @param {Set<number>} taken ports already chosen for other services in this run; updated
 */
export async function choosePort(candidates, taken) {
  for (const port of candidates) {
    if (!port || taken.has(port)) continue
    if (await isPortFree(port)) {
      taken.add(port)
      return port
    }
  }
  for (;;) {
    const port = /** @type {number} */ (await anyFreePort())
    if (!taken.has(port)) {
      taken.add(port)
      return port
    }
  }
}

/** Resolves with the first line an SMTP server sends (its 220 greeting), or rejects. */
export function smtpGreeting(/** @type {number} */ port, host = '127.0.0.1', timeoutMs = 2000) {
  return new Promise((resolve, reject) => {
    const socket = net.connect({ port, host })
    const timer = setTimeout(() => {
      socket.destroy()
      reject(new Error('timeout'))
    }, timeoutMs)
    socket.once('data', (data) => {
      clearTimeout(timer)
      socket.end('QUIT\r\n')
      resolve(data.toString('utf8').split('\r\n')[0])
    })
    socket.once('error', (err) => {
      clearTimeout(timer)
      reject(err)
    })
  })
}

/** True when an HTTP request to url gets any response within the timeout. */
export async function httpAnswers(/** @type {string} */ url, timeoutMs = 2000) {
  try {
    const res = await fetch(url, { signal: AbortSignal.timeout(timeoutMs) })
    await res.arrayBuffer()
    return true
  } catch {
    return false
  }
}

/**
 * Polls `check` until it resolves truthy or the time is up.
 * @param {() => Promise<unknown>} check
 * @param {{ timeoutMs?: number, intervalMs?: number, abort?: () => string | null }} [options] abort returns a reason to stop early
 */
export async function waitFor(check, { timeoutMs = 20_000, intervalMs = 150, abort } = {}) {
  const deadline = Date.now() + timeoutMs
  for (;;) {
    const reason = abort?.()
    if (reason) throw new Error(reason)
    if (await check().catch(() => false)) return
    if (Date.now() > deadline) throw new Error(`not ready after ${Math.round(timeoutMs / 1000)} s`)
    await new Promise((r) => setTimeout(r, intervalMs))
  }
}
