// nginx (Debian package) in front of several app instances, run as a plain foreground process whose
// configuration, pid file, logs and temporary files all live in one folder (e.g. .data/<profile>/nginx/):
// no system service, no file outside that folder, an unprivileged port on loopback.
// Used by scripts/cluster.mjs (by hand, dev profile) and tests/e2e/cluster.test.ts.
import { execFileSync, spawn } from 'node:child_process'
import fs from 'node:fs'
import path from 'node:path'
import { commandLine, isAlive } from './proc.mjs'

export const NGINX_BIN = '/usr/sbin/nginx'

/** The largest request body the app itself takes: a temperature grid CSV (20 million characters, sent as JSON). */
export const CLIENT_MAX_BODY = '32m'

/**
 * @typedef {object} NginxOptions
 * @property {string} dir folder for nginx.conf, nginx.pid, logs/ and tmp/ (created)
 * @property {number} port where nginx listens (127.0.0.1)
 * @property {number[]} upstreams ports of the app instances (127.0.0.1)
 * @property {boolean} [showUpstream] add the response header X-Greybody-Upstream with the instance(s) nginx used
 *   (for tests and trying things out; a production balancer would not tell clients its internal addresses)
 */

/** The nginx.conf text for the options (absolute paths, so it does not depend on nginx's compiled-in prefix). */
export function nginxConfig(/** @type {NginxOptions} */ { dir, port, upstreams, showUpstream = true }) {
  const abs = path.resolve(dir)
  // Run as root (CI, the set-up scripts), the master keeps root and the workers drop to nobody; nginx itself
  // creates the temporary folders below and hands them to that user.
  const user = process.getuid?.() === 0 ? 'user nobody nogroup;\n' : ''
  const servers = upstreams.map((p) => `    server 127.0.0.1:${p} max_fails=1 fail_timeout=10s;`).join('\n')
  return `# Written by scripts/lib/nginx.mjs; regenerated on every start.
${user}worker_processes auto;
daemon off;
pid ${abs}/nginx.pid;
error_log ${abs}/logs/error.log warn;

events {
  worker_connections 1024;
}

http {
  server_tokens off;
  default_type application/octet-stream;
  log_format greybody '$remote_addr [$time_iso8601] "$request" $status $body_bytes_sent '
                      'upstream=$upstream_addr upstream_status=$upstream_status rt=$request_time urt=$upstream_response_time';
  access_log ${abs}/logs/access.log greybody;
  client_body_temp_path ${abs}/tmp/body;
  proxy_temp_path ${abs}/tmp/proxy;
  fastcgi_temp_path ${abs}/tmp/fastcgi;
  uwsgi_temp_path ${abs}/tmp/uwsgi;
  scgi_temp_path ${abs}/tmp/scgi;

  upstream greybody {
    # Shared by all workers, so round robin and the failure marks are one state.
    zone greybody 64k;
    # An instance that fails once is left out for 10 s, then tried again.
${servers}
    keepalive 32;
    # Below Node's 5 s keep-alive timeout: nginx never sends a request on a connection the app is closing.
    keepalive_timeout 4s;
  }

  server {
    listen 127.0.0.1:${port};
    # The app's own largest body (images do not pass here: the browser PUTs them straight to object storage).
    client_max_body_size ${CLIENT_MAX_BODY};

    location / {
      proxy_pass http://greybody;
      proxy_http_version 1.1;
      proxy_set_header Connection "";
      # The public address as the browser used it: the app compares Origin with it (and with NUXT_APP_URL).
      proxy_set_header Host $http_host;
      # nginx is the edge: the client's own X-Forwarded-* values are replaced, never passed on
      # (the app reads the first X-Forwarded-For address when NUXT_TRUST_PROXY=1).
      proxy_set_header X-Forwarded-For $remote_addr;
      proxy_set_header X-Forwarded-Proto $scheme;
      proxy_set_header X-Forwarded-Host $http_host;
      proxy_set_header X-Forwarded-Port $server_port;
      # A dead or unreachable instance is skipped: GET/HEAD are retried on the other one; POST, PATCH and DELETE
      # only when they never reached the dead instance (nginx does not repeat a write that may have happened).
      proxy_next_upstream error timeout;
      proxy_next_upstream_tries 2;
      proxy_next_upstream_timeout 15s;
      proxy_connect_timeout 2s;
      # Long enough for the slowest request the app answers (a 100 000-row import commit).
      proxy_read_timeout 300s;
      proxy_send_timeout 60s;
${showUpstream ? '      add_header X-Greybody-Upstream $upstream_addr always;\n' : ''}    }
  }
}
`
}

/** True when the nginx binary is installed (scripts/ensure-system.sh --with-nginx installs it). */
export function nginxInstalled() {
  return fs.existsSync(NGINX_BIN)
}

/** Stops an nginx left running from this folder (by its pid file, checking the process is ours), e.g. after a crash. */
export async function stopStaleNginx(/** @type {string} */ dir) {
  const abs = path.resolve(dir)
  let pid = 0
  try {
    pid = Number(fs.readFileSync(path.join(abs, 'nginx.pid'), 'utf8').trim())
  } catch {
    return
  }
  if (!isAlive(pid) || !commandLine(pid).includes(path.join(abs, 'nginx.conf'))) return
  process.kill(pid, 'SIGTERM')
  for (let i = 0; i < 50 && isAlive(pid); i++) await new Promise((r) => setTimeout(r, 100))
  if (isAlive(pid)) killWithWorkers(pid)
}

/** SIGKILL for a master and its workers (workers outlive a killed master). */
function killWithWorkers(/** @type {number | undefined} */ pid) {
  if (!pid) return
  let workers = []
  try {
    workers = fs.readFileSync(`/proc/${pid}/task/${pid}/children`, 'utf8').trim().split(/\s+/).filter(Boolean).map(Number)
  } catch { /* gone already */ }
  for (const p of [pid, ...workers]) {
    try { process.kill(p, 'SIGKILL') } catch { /* gone already */ }
  }
}

/**
 * Writes the configuration, checks it (`nginx -t`), starts nginx in the foreground as a child of this process and
 * waits until it accepts connections. `stop()` ends it (and its workers).
 * @param {NginxOptions} options
 */
export async function startNginx(options) {
  if (!nginxInstalled()) throw new Error(`${NGINX_BIN} is missing: run \`bash scripts/ensure-system.sh --with-nginx\` as root.`)
  const dir = path.resolve(options.dir)
  fs.mkdirSync(path.join(dir, 'logs'), { recursive: true })
  fs.mkdirSync(path.join(dir, 'tmp'), { recursive: true })
  await stopStaleNginx(dir)
  const conf = path.join(dir, 'nginx.conf')
  fs.writeFileSync(conf, nginxConfig(options))
  const args = ['-p', dir, '-c', conf, '-e', path.join(dir, 'logs', 'error.log')]
  try {
    execFileSync(NGINX_BIN, [...args, '-t', '-q'], { stdio: ['ignore', 'ignore', 'pipe'] })
  } catch (err) {
    throw new Error(`nginx refused ${conf}: ${/** @type {any} */ (err).stderr?.toString() ?? err}`)
  }
  const child = spawn(NGINX_BIN, args, { stdio: ['ignore', 'ignore', 'pipe'] })
  let stderr = ''
  child.stderr.on('data', (b) => { stderr += b.toString() })
  const url = `http://127.0.0.1:${options.port}`
  const until = Date.now() + 15_000
  for (;;) {
    if (child.exitCode !== null) throw new Error(`nginx exited with code ${child.exitCode}: ${stderr}`)
    // Any answer (even 502 while no instance is up) means nginx listens.
    if (await fetch(`${url}/api/health`).then(() => true, () => false)) break
    if (Date.now() > until) {
      killWithWorkers(child.pid)
      throw new Error(`nginx did not listen on ${url} within 15 s: ${stderr}`)
    }
    await new Promise((r) => setTimeout(r, 100))
  }
  return {
    child,
    url,
    conf,
    accessLog: path.join(dir, 'logs', 'access.log'),
    errorLog: path.join(dir, 'logs', 'error.log'),
    /** Fast shutdown (SIGTERM: the master stops its workers), SIGKILL after 5 s. */
    async stop() {
      if (child.exitCode !== null || child.signalCode !== null) return
      const exited = new Promise((r) => child.once('exit', r))
      child.kill('SIGTERM')
      await Promise.race([exited, new Promise((r) => setTimeout(r, 5000))])
      if (child.exitCode === null && child.signalCode === null) killWithWorkers(child.pid)
    },
  }
}
