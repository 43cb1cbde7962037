import { spawn, type ChildProcess } from 'node:child_process'
import { createServer } from 'node:net'
import { OUTPUT_DIR, ROOT, testEnv } from './env'

// A separate process of the built server, for tests that need their own configuration (a service pointed elsewhere)
// or that must watch one process live through a fault. The shared server of global-setup.ts is left alone.

/** A free TCP port on loopback. */
export async function freePort(): Promise<number> {
  return new Promise((resolve, reject) => {
    const s = createServer()
    s.once('error', reject)
    s.listen(0, '127.0.0.1', () => {
      const port = (s.address() as { port: number }).port
      s.close(() => resolve(port))
    })
  })
}

export interface AppProcess { child: ChildProcess; port: number; url: string; log: string[] }

/** Starts the built server on a free port with the test profile's services and `extra` variables; waits for health. */
export async function startAppProcess(extra: Record<string, string> = {}): Promise<AppProcess> {
  const port = await freePort()
  const url = `http://127.0.0.1:${port}`
  const env = {
    ...process.env, ...testEnv(), NODE_ENV: 'production', PORT: String(port), NITRO_PORT: String(port), NITRO_HOST: '127.0.0.1',
    NUXT_APP_URL: url, AUTH_ORIGIN: `${url}/api/auth`, BCRYPT_ROUNDS: '4', NUXT_SCHEDULER: 'off', NUXT_OUTBOX_WORKER: 'off', ...extra,
  } as NodeJS.ProcessEnv
  const child = spawn('node', [`${OUTPUT_DIR}/server/index.mjs`], { cwd: ROOT, env, stdio: ['ignore', 'pipe', 'pipe'] })
  const app: AppProcess = { child, port, url, log: [] }
  // Whole lines only: a chunk may end in the middle of one.
  const reader = () => {
    let rest = ''
    return (b: Buffer) => {
      const lines = (rest + b.toString()).split('\n')
      rest = lines.pop() ?? ''
      app.log.push(...lines.filter(Boolean))
    }
  }
  child.stdout!.on('data', reader())
  child.stderr!.on('data', reader())
  // Generous: on a busy two-core machine a cold start of the built server can take a while.
  const until = Date.now() + 90_000
  while (Date.now() < until) {
    if (child.exitCode !== null) throw new Error(`app exited: ${app.log.join('\n')}`)
    if (await fetch(`${url}/api/health`).then((r) => r.ok, () => false)) return app
    await new Promise((r) => setTimeout(r, 200))
  }
  child.kill('SIGKILL')
  throw new Error(`app on ${port} did not start: ${app.log.join('\n')}`)
}

/** Stops a process started by startAppProcess (SIGTERM, then SIGKILL after 5 s). */
export async function stopAppProcess(app: AppProcess | undefined): Promise<void> {
  if (!app || app.child.exitCode !== null || app.child.signalCode !== null) return
  const exited = new Promise((r) => app.child.once('exit', r))
  app.child.kill('SIGTERM')
  await Promise.race([exited, new Promise((r) => setTimeout(r, 5000))])
  if (app.child.exitCode === null && app.child.signalCode === null) app.child.kill('SIGKILL')
}
