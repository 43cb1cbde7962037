// One process hosting every local fake (S3, SMTP catcher + its HTTP API, Stripe). Started detached by
// scripts/services.mjs with its settings in GREYBODY_FAKES_CONFIG (JSON); logs go to stdout/stderr,
// which services.mjs points at .data/<profile>/logs/fakes.log. Stops cleanly on SIGTERM/SIGINT.
import path from 'node:path'
import { fileURLToPath } from 'node:url'
import { startMailCatcher } from './mail-catcher.mjs'
import { startS3Fake } from './s3.mjs'
import { startStripeFake } from './stripe-fake.mjs'

/**
 * @typedef {{
 *   s3: { port: number, directory: string },
 *   mail: { smtpPort: number, httpPort: number, file: string | null },
 *   stripe: { port: number, webhookUrl: string | null, webhookSecret: string, stateFile: string | null },
 * }} FakesConfig
 */

const stamp = () => new Date().toISOString()
const log = (/** @type {string} */ line) => console.log(`${stamp()} ${line}`)

/**
 * Starts all fakes in this process; closes the ones already started if a later one fails.
 * @param {FakesConfig} config
 */
export async function startFakes(config) {
  /** @type {{ name: string, close: () => Promise<void> }[]} */
  const started = []
  const closeAll = async () => {
    for (const s of started.reverse()) await s.close().catch((err) => log(`closing ${s.name}: ${err.message}`))
  }
  try {
    const s3 = await startS3Fake({ port: config.s3.port, directory: config.s3.directory })
    started.push({ name: 's3', close: s3.close })
    const mail = await startMailCatcher({ smtpPort: config.mail.smtpPort, httpPort: config.mail.httpPort, file: config.mail.file })
    started.push({ name: 'mail', close: mail.close })
    const stripe = await startStripeFake({ ...config.stripe, log })
    started.push({ name: 'stripe', close: stripe.close })
    return { s3, mail, stripe, close: closeAll }
  } catch (err) {
    await closeAll()
    throw err
  }
}

const isMain = process.argv[1] && path.resolve(process.argv[1]) === fileURLToPath(import.meta.url)
if (isMain) {
  const raw = process.env.GREYBODY_FAKES_CONFIG
  if (!raw) {
    console.error('GREYBODY_FAKES_CONFIG is not set; start the fakes through `node scripts/services.mjs start`.')
    process.exit(2)
  }
  try {
    const fakes = await startFakes(JSON.parse(raw))
    log(`ready: s3 ${fakes.s3.endpoint} · smtp ${fakes.mail.smtpUrl} · mail api ${fakes.mail.httpUrl} · stripe ${fakes.stripe.url} (pid ${process.pid})`)
    let stopping = false
    const stop = async (/** @type {string} */ signal) => {
      if (stopping) return
      stopping = true
      log(`${signal}: stopping`)
      // Pending webhooks are given a moment, not forever: a stop must not hang on an absent app.
      await Promise.race([fakes.close(), new Promise((r) => setTimeout(r, 5000))])
      process.exit(0)
    }
    process.on('SIGTERM', () => void stop('SIGTERM'))
    process.on('SIGINT', () => void stop('SIGINT'))
  } catch (err) {
    log(`failed to start: ${err instanceof Error ? err.stack : err}`)
    process.exit(1)
  }
}
