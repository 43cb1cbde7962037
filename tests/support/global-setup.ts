import { execFileSync, spawn, type ChildProcess } from 'node:child_process'
import { existsSync, mkdirSync, openSync } from 'node:fs'
import type { TestProject } from 'vitest/node'
import { OUTPUT_DIR, PROFILE, ROOT, testEnv } from './env'

// e2e and browser projects share one built server; the first to start it owns it, the last to finish stops it.
const shared = globalThis as unknown as { __greybodyServer?: { child: ChildProcess; users: number } }

async function waitForHealth(url: string, child: ChildProcess, timeoutMs = 60_000) {
  const until = Date.now() + timeoutMs
  while (Date.now() < until) {
    if (child.exitCode !== null) throw new Error(`The app exited with code ${child.exitCode}; see .data/${PROFILE}/logs/app.log`)
    try {
      const res = await fetch(`${url}/api/health`)
      if (res.ok) return
    } catch { /* not up yet */ }
    await new Promise((r) => setTimeout(r, 250))
  }
  throw new Error(`The app did not answer ${url}/api/health within ${timeoutMs} ms`)
}

export default async function setup(project: TestProject) {
  const env = testEnv()
  const baseUrl = env.NUXT_APP_URL!
  project.provide('baseUrl', baseUrl)
  project.provide('databaseUrl', env.NUXT_DATABASE_URL!)
  project.provide('mailCatcherUrl', env.NUXT_MAIL_CATCHER_URL!)
  if (shared.__greybodyServer) {
    shared.__greybodyServer.users++
  } else {
    // Migrations are TypeScript files loaded by Kysely's provider: run them through tsx, as the start script does.
    execFileSync('node', ['--import', 'tsx', 'scripts/migrate.ts'], { cwd: ROOT, env: { ...process.env, ...env }, stdio: 'inherit' })
    if (!existsSync(`${ROOT}${OUTPUT_DIR}/server/index.mjs`)) throw new Error(`No build in ${OUTPUT_DIR}: run \`npx nuxt build\` (npm run test:all does it).`)
    // A stale server still answering on this port would be tested instead of the fresh build: refuse.
    const stale = await fetch(`${baseUrl}/api/health`).then(() => true, () => false)
    if (stale) throw new Error(`Something already answers on ${baseUrl}: stop it (or use another GREYBODY_TEST_PROFILE) and run again.`)
    mkdirSync(`${ROOT}.data/${PROFILE}/logs`, { recursive: true })
    const log = openSync(`${ROOT}.data/${PROFILE}/logs/app.log`, 'a')
    const child = spawn('node', [`${OUTPUT_DIR}/server/index.mjs`], {
      cwd: ROOT,
      // Notices: no clock-driven scheduler or outbox worker in the shared server; tests run both through the
      // test hook (POST /api/dev/notices/run, enabled by NUXT_TEST_HOOKS) with a chosen clock.
      env: { ...process.env, ...env, NODE_ENV: 'production', BCRYPT_ROUNDS: '4', NUXT_SCHEDULER: 'off', NUXT_OUTBOX_WORKER: 'off', NUXT_TEST_HOOKS: '1' },
      stdio: ['ignore', log, log],
    })
    shared.__greybodyServer = { child, users: 1 }
    await waitForHealth(baseUrl, child)
  }
  return async () => {
    const s = shared.__greybodyServer
    if (!s) return
    if (--s.users > 0) return
    s.child.kill('SIGTERM')
    shared.__greybodyServer = undefined
  }
}

declare module 'vitest' {
  export interface ProvidedContext {
    baseUrl: string
    databaseUrl: string
    mailCatcherUrl: string
  }
}
