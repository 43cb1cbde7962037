#!/usr/bin/env node
// Two instances of the built app behind nginx, on loopback, for trying Greybody as it runs on several machines:
//
//   node scripts/cluster.mjs [--profile dev] [--instances 2]
//
// Starts the profile's services (idempotent) and applies migrations, as `npm start` does; then starts the instances
// of .output/server/index.mjs on free ports, each with the same services and secret, and nginx (Debian package,
// installed when missing; its configuration, pid file and logs in .data/<profile>/nginx/) on the profile's app
// address (http://127.0.0.1:3000 for dev), which is also every instance's NUXT_APP_URL and AUTH_ORIGIN.
// Both instances run the scheduler and the outbox worker: each tick runs on one of them.
// `kill -9` one instance's pid (printed) to watch nginx carry on with the other; Ctrl-C stops everything.
import { execFileSync, spawn } from 'node:child_process'
import fs from 'node:fs'
import path from 'node:path'
import { fileURLToPath } from 'node:url'
import { choosePort, httpAnswers } from './lib/net.mjs'
import { nginxInstalled, startNginx } from './lib/nginx.mjs'
import { startServices } from './services.mjs'

const ROOT = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '..')

function option(/** @type {string} */ name, /** @type {string} */ fallback) {
  const i = process.argv.indexOf(`--${name}`)
  return i > 0 && process.argv[i + 1] ? process.argv[i + 1] : fallback
}

const profile = option('profile', 'dev')
const count = Math.max(1, Math.min(8, Number(option('instances', '2')) || 2))
const output = profile === 'dev' || profile === 'test' ? '.output' : `.output-${profile}`
const entry = path.join(ROOT, output, 'server', 'index.mjs')
const dataDir = path.join(ROOT, '.data', profile)

if (!fs.existsSync(entry)) {
  console.error(`No build at ${path.relative(ROOT, entry)}: run 'npm run setup' (or 'npx nuxt build') first.`)
  process.exit(1)
}
if (!nginxInstalled()) {
  console.log('nginx is missing: installing the Debian package (needs root)…')
  execFileSync('bash', [path.join(ROOT, 'scripts', 'ensure-system.sh'), '--with-nginx'], { stdio: 'inherit' })
}

const { env: services } = await startServices({ profile })
const publicUrl = services.NUXT_APP_URL
const publicPort = Number(new URL(publicUrl).port)
if (await httpAnswers(`${publicUrl}/api/health`)) {
  console.error(`Something already answers on ${publicUrl} (npm start?): stop it first; the cluster takes that address.`)
  process.exit(1)
}
execFileSync('node', ['--import', 'tsx', 'scripts/migrate.ts'], { cwd: ROOT, env: { ...process.env, ...services }, stdio: 'inherit' })

const taken = new Set([publicPort])
const logs = path.join(dataDir, 'logs')
fs.mkdirSync(logs, { recursive: true })
/** @type {Array<{ n: number, port: number, child: import('node:child_process').ChildProcess, log: string }>} */
const instances = []
let stopping = false
/** @type {Awaited<ReturnType<typeof startNginx>> | undefined} */
let nginx

async function stopAll(code = 0) {
  if (stopping) return
  stopping = true
  console.log('\nStopping nginx and the instances…')
  await nginx?.stop()
  await Promise.all(instances.map(({ child }) => new Promise((resolve) => {
    if (child.exitCode !== null || child.signalCode !== null) return resolve(undefined)
    child.once('exit', resolve)
    child.kill('SIGTERM')
    setTimeout(() => { child.kill('SIGKILL'); resolve(undefined) }, 5000).unref()
  })))
  process.exit(code)
}
process.on('SIGINT', () => stopAll(0))
process.on('SIGTERM', () => stopAll(0))

for (let n = 1; n <= count; n++) {
  const port = await choosePort([publicPort + n], taken)
  const log = path.join(logs, `cluster-app-${n}.log`)
  const fd = fs.openSync(log, 'a')
  const child = spawn('node', [entry], {
    cwd: ROOT,
    env: {
      ...process.env, ...services, NODE_ENV: 'production', PORT: String(port), NITRO_PORT: String(port), HOST: '127.0.0.1', NITRO_HOST: '127.0.0.1',
      // The public address is nginx's: links in e-mails, sign-in and the cross-site check all use it.
      NUXT_APP_URL: publicUrl, AUTH_ORIGIN: `${publicUrl}/api/auth`, NUXT_TRUST_PROXY: '1',
    },
    stdio: ['ignore', fd, fd],
  })
  fs.closeSync(fd)
  instances.push({ n, port, child, log })
  child.once('exit', (code, signal) => {
    if (stopping) return
    const alive = instances.filter((i) => i.child.exitCode === null && i.child.signalCode === null)
    console.log(`instance ${n} (pid ${child.pid}, :${port}) exited (${signal ?? `code ${code}`}); ${alive.length} left${alive.length ? ': nginx sends everything to ' + alive.map((i) => `:${i.port}`).join(', ') : ''}`)
    if (!alive.length) stopAll(1)
  })
}

try {
  const until = Date.now() + 90_000
  for (const i of instances) {
    while (!(await httpAnswers(`http://127.0.0.1:${i.port}/api/health`))) {
      if (i.child.exitCode !== null) throw new Error(`instance ${i.n} exited during start; see ${path.relative(ROOT, i.log)}`)
      if (Date.now() > until) throw new Error(`instance ${i.n} did not answer within 90 s; see ${path.relative(ROOT, i.log)}`)
      await new Promise((r) => setTimeout(r, 250))
    }
  }
  nginx = await startNginx({ dir: path.join(dataDir, 'nginx'), port: publicPort, upstreams: instances.map((i) => i.port) })
} catch (err) {
  console.error(err instanceof Error ? err.message : err)
  await stopAll(1)
}

const rel = (/** @type {string} */ f) => path.relative(ROOT, f)
console.log(`
Greybody runs on ${publicUrl} — nginx in front of ${count} instances (Ctrl-C stops them; 'npm run stop' stops the services).
${instances.map((i) => `  instance ${i.n}: pid ${i.child.pid}, http://127.0.0.1:${i.port}, log ${rel(i.log)}`).join('\n')}
  nginx: pid ${nginx?.child.pid}, config ${rel(nginx?.conf ?? '')}, access log ${rel(nginx?.accessLog ?? '')}
Each answer carries X-Greybody-Upstream (the instance nginx used), e.g.:
  curl -si ${publicUrl}/api/health | grep -i x-greybody-upstream
Try a failure: kill -9 ${instances[0]?.child.pid}   (nginx skips the dead instance; sessions stay valid on the other)`)
