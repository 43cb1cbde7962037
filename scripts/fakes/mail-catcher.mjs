// Local SMTP catcher for development and tests: accepts every message, keeps it in memory (and optionally
// in a JSON-lines file so a restart keeps the mailbox) and lists it over a small HTTP API that the app's
// development mailbox page and the tests read. Loopback only; never use it as a real mail server.
import fs from 'node:fs'
import http from 'node:http'
import path from 'node:path'
import { randomUUID } from 'node:crypto'
import { SMTPServer } from 'smtp-server'
import { simpleParser } from 'mailparser'

/**
 * @typedef {{ id: string, from: string, to: string[], subject: string, text: string, html: string, date: string, headers?: Record<string, string> }} CaughtMessage
 * @typedef {{ smtpPort: number, httpPort: number, smtpUrl: string, httpUrl: string, messages: () => CaughtMessage[], clear: () => void, close: () => Promise<void> }} MailCatcher
 */

/**
 * Starts the SMTP catcher and its HTTP API on 127.0.0.1 (port 0 = any free port).
 * @param {{ smtpPort?: number, httpPort?: number, host?: string, file?: string | null, maxMessages?: number }} [options]
 * @returns {Promise<MailCatcher>}
 */
export async function startMailCatcher({ smtpPort = 0, httpPort = 0, host = '127.0.0.1', file = null, maxMessages = 2000 } = {}) {
  /** @type {CaughtMessage[]} oldest first; reversed when listed */
  let store = file ? readMailFile(file) : []

  const smtp = new SMTPServer({
    // A catcher must accept anything the app sends: no TLS upgrade (nodemailer would try it and fail on
    // a self-signed certificate), no authentication, no size limit below what an attachment may need.
    disabledCommands: ['STARTTLS', 'AUTH'],
    authOptional: true,
    logger: false,
    size: 50 * 1024 * 1024,
    onData(stream, session, callback) {
      simpleParser(stream)
        .then((parsed) => {
          const envelopeTo = session.envelope.rcptTo.map((r) => r.address.toLowerCase())
          const headerFrom = parsed.from?.text ?? ''
          /** @type {CaughtMessage} */
          const message = {
            id: randomUUID(),
            from: headerFrom || (session.envelope.mailFrom ? session.envelope.mailFrom.address : ''),
            to: envelopeTo,
            subject: parsed.subject ?? '',
            text: parsed.text ?? '',
            html: typeof parsed.html === 'string' ? parsed.html : '',
            date: (parsed.date ?? new Date()).toISOString(),
            // Raw header values by lower-case name (unfolded), e.g. for the List-Unsubscribe headers of notices.
            headers: Object.fromEntries((parsed.headerLines ?? []).map((h) => [h.key, h.line.slice(h.line.indexOf(':') + 1).replace(/\r?\n(?=[ \t])/g, '').trim()])),
          }
          store.push(message)
          if (store.length > maxMessages) store = store.slice(-maxMessages)
          if (file) fs.appendFileSync(file, JSON.stringify(message) + '\n')
          callback()
        })
        .catch((err) => callback(err))
    },
  })
  smtp.on('error', (err) => console.error('[mail-catcher] smtp error:', err.message))

  const api = http.createServer((req, res) => {
    const url = new URL(req.url ?? '/', 'http://localhost')
    const to = url.searchParams.get('to')?.toLowerCase()
    const matches = (/** @type {CaughtMessage} */ m) => !to || m.to.includes(to)
    const send = (/** @type {number} */ status, /** @type {unknown} */ body) => {
      res.writeHead(status, { 'content-type': 'application/json; charset=utf-8', 'cache-control': 'no-store' })
      res.end(JSON.stringify(body))
    }
    const byId = url.pathname.match(/^\/messages\/([\w-]+)$/)
    if (req.method === 'GET' && url.pathname === '/messages') return send(200, store.filter(matches).reverse())
    if (req.method === 'GET' && byId) {
      const found = store.find((m) => m.id === byId[1])
      return found ? send(200, found) : send(404, { error: 'not found' })
    }
    if (req.method === 'DELETE' && url.pathname === '/messages') {
      const removed = store.filter(matches).length
      store = store.filter((m) => !matches(m))
      if (file) writeMailFile(file, store)
      return send(200, { deleted: removed })
    }
    if (req.method === 'GET' && url.pathname === '/health') return send(200, { ok: true, messages: store.length })
    send(404, { error: 'not found' })
  })

  await listen(smtp.server, smtpPort, host)
  try {
    await listen(api, httpPort, host)
  } catch (err) {
    await new Promise((resolve) => smtp.close(() => resolve(undefined)))
    throw err
  }
  const actualSmtp = /** @type {import('node:net').AddressInfo} */ (smtp.server.address()).port
  const actualHttp = /** @type {import('node:net').AddressInfo} */ (api.address()).port

  return {
    smtpPort: actualSmtp,
    httpPort: actualHttp,
    smtpUrl: `smtp://${host}:${actualSmtp}`,
    httpUrl: `http://${host}:${actualHttp}`,
    messages: () => store.slice().reverse(),
    clear: () => {
      store = []
      if (file) writeMailFile(file, store)
    },
    close: async () => {
      api.closeAllConnections()
      await Promise.all([
        new Promise((resolve) => api.close(() => resolve(undefined))),
        new Promise((resolve) => smtp.close(() => resolve(undefined))),
      ])
    },
  }
}

/** Listens and turns a bind failure (EADDRINUSE…) into a rejected promise instead of an 'error' event. */
function listen(/** @type {import('node:net').Server} */ server, /** @type {number} */ port, /** @type {string} */ host) {
  return new Promise((resolve, reject) => {
    const onError = (/** @type {Error} */ err) => reject(err)
    server.once('error', onError)
    server.listen(port, host, () => {
      server.off('error', onError)
      resolve(undefined)
    })
  })
}

/** @returns {CaughtMessage[]} */
function readMailFile(/** @type {string} */ file) {
  if (!fs.existsSync(file)) return []
  const out = []
  for (const line of fs.readFileSync(file, 'utf8').split('\n')) {
    if (!line.trim()) continue
    try {
      out.push(JSON.parse(line))
    } catch {
      // A line cut short by a crash mid-append is skipped rather than losing the whole mailbox.
    }
  }
  return out
}

function writeMailFile(/** @type {string} */ file, /** @type {CaughtMessage[]} */ messages) {
  fs.mkdirSync(path.dirname(file), { recursive: true })
  const tmp = `${file}.tmp`
  fs.writeFileSync(tmp, messages.map((m) => JSON.stringify(m) + '\n').join(''))
  fs.renameSync(tmp, file)
}
