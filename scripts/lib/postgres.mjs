// A project-local PostgreSQL cluster: Debian's binaries, data inside .data/<profile>/pg, loopback only.
// initdb and pg_ctl refuse to run as root, so as root they run as the `postgres` system user.
import fs from 'node:fs'
import path from 'node:path'
import pg from 'pg'
import { run, tail } from './proc.mjs'

export const PG_BIN = process.env.GREYBODY_PG_BIN ?? '/usr/lib/postgresql/15/bin'
const isRoot = process.getuid?.() === 0

/** Runs a PostgreSQL binary as the cluster owner (postgres when we are root). */
function pgRun(/** @type {string} */ tool, /** @type {string[]} */ args) {
  const bin = path.join(PG_BIN, tool)
  return isRoot ? run('runuser', ['-u', 'postgres', '--', bin, ...args]) : run(bin, args)
}

/** Installs Debian's `postgresql` package when its binaries are missing (root only). */
export function ensurePostgresInstalled(/** @type {(line: string) => void} */ say) {
  if (fs.existsSync(path.join(PG_BIN, 'initdb'))) return
  if (!isRoot) throw new Error(`PostgreSQL binaries not found in ${PG_BIN}. Install them with: sudo apt-get install -y postgresql`)
  const env = { ...process.env, DEBIAN_FRONTEND: 'noninteractive' }
  for (const args of [['update'], ['install', '-y', 'postgresql']]) {
    say(`PostgreSQL is missing: running apt-get ${args.join(' ')}`)
    const r = run('apt-get', args, { inherit: true, env })
    if (r.status !== 0) throw new Error(`apt-get ${args.join(' ')} failed (exit ${r.status})`)
  }
  if (!fs.existsSync(path.join(PG_BIN, 'initdb'))) throw new Error(`apt-get installed postgresql but ${PG_BIN}/initdb is still missing (another major version?). Set GREYBODY_PG_BIN.`)
}

/** The port of the running cluster (from postmaster.pid), or null when it is not running. */
export function runningPort(/** @type {string} */ dataDir) {
  if (!fs.existsSync(path.join(dataDir, 'PG_VERSION'))) return null
  if (pgRun('pg_ctl', ['status', '-D', dataDir]).status !== 0) return null
  try {
    // postmaster.pid: pid, data dir, start time, port, socket dir, listen address, …
    const port = Number(fs.readFileSync(path.join(dataDir, 'postmaster.pid'), 'utf8').split('\n')[3])
    return Number.isInteger(port) && port > 0 ? port : null
  } catch {
    return null
  }
}

/** The pid of the running postmaster, or null. */
export function postmasterPid(/** @type {string} */ dataDir) {
  try {
    return Number(fs.readFileSync(path.join(dataDir, 'postmaster.pid'), 'utf8').split('\n')[0]) || null
  } catch {
    return null
  }
}

function chownToPostgres(/** @type {string} */ target) {
  if (!isRoot) return
  const r = run('chown', ['-R', 'postgres:postgres', target])
  if (r.status !== 0) throw new Error(`chown postgres ${target} failed: ${r.stderr.trim()}`)
}

// The postgres user must be able to reach the data folder through every parent directory.
function checkTraversable(/** @type {string} */ dir, /** @type {string} */ projectRoot) {
  if (!isRoot) return
  if (run('runuser', ['-u', 'postgres', '--', 'test', '-x', dir]).status === 0) return
  const blocked = []
  for (let d = dir; ; d = path.dirname(d)) {
    if (!(fs.statSync(d).mode & 0o001)) blocked.push(d)
    if (d === path.dirname(d)) break
  }
  const inside = blocked.filter((d) => d.startsWith(projectRoot + path.sep))
  for (const d of inside) fs.chmodSync(d, fs.statSync(d).mode | 0o001)
  const outside = blocked.filter((d) => !inside.includes(d))
  if (outside.length)
    throw new Error(`The postgres user cannot reach ${dir}: these folders are not searchable by others: ${outside.join(', ')}.\n` +
      `Allow it with: chmod o+x ${outside.join(' ')}  (or keep the project in a folder postgres can traverse)`)
}

function localeArgs() {
  // C.UTF-8 keeps byte-order collation but lets lower()/upper() handle non-ASCII e-mail addresses.
  const locales = run('locale', ['-a']).stdout.toLowerCase().split('\n')
  return locales.includes('c.utf8') || locales.includes('c.utf-8') ? ['--locale=C.UTF-8', '--encoding=UTF8'] : ['--no-locale', '--encoding=UTF8']
}

/**
 * Initialises (once) and starts the cluster; reuses it when already running.
 * @param {{ dataDir: string, logFile: string, projectRoot: string, choosePort: () => Promise<number>, fast: boolean, say: (line: string) => void }} o
 * @returns {Promise<{ port: number, reused: boolean }>}
 */
export async function startPostgres({ dataDir, logFile, projectRoot, choosePort, fast, say }) {
  const existingPort = runningPort(dataDir)
  if (existingPort) return { port: existingPort, reused: true }

  fs.mkdirSync(path.dirname(dataDir), { recursive: true, mode: 0o755 })
  checkTraversable(path.dirname(dataDir), projectRoot)
  if (!fs.existsSync(path.join(dataDir, 'PG_VERSION'))) {
    if (fs.existsSync(dataDir) && fs.readdirSync(dataDir).length > 0)
      throw new Error(`${dataDir} exists but holds no PostgreSQL cluster; move it away and start again.`)
    fs.mkdirSync(dataDir, { recursive: true, mode: 0o700 })
    chownToPostgres(dataDir)
    say(`initialising PostgreSQL cluster in ${path.relative(projectRoot, dataDir)}`)
    // Local socket connections are trusted (the socket sits in the 0700 data folder, reachable by its
    // owner and root only); TCP connections need the role's password.
    const r = pgRun('initdb', ['-D', dataDir, '-U', 'postgres', '--auth-local=trust', '--auth-host=scram-sha-256', ...localeArgs()])
    if (r.status !== 0) throw new Error(`initdb failed:\n${r.stdout}${r.stderr}`)
  }

  const port = await choosePort()
  if (Buffer.byteLength(path.join(dataDir, `.s.PGSQL.${port}`)) > 107)
    throw new Error(`The project path is too long for a PostgreSQL socket inside ${dataDir} (limit 107 bytes); move the project to a shorter path.`)
  const settings = [
    '# Written by scripts/services.mjs on every start; edits are overwritten.',
    "listen_addresses = '127.0.0.1'",
    `port = ${port}`,
    `unix_socket_directories = '${dataDir.replaceAll("'", "''")}'`,
    // Durability is traded for speed in the test profile only: its data is thrown away anyway.
    ...(fast ? ['fsync = off', 'synchronous_commit = off', 'full_page_writes = off'] : []),
  ]
  fs.writeFileSync(path.join(dataDir, 'greybody.conf'), settings.join('\n') + '\n')
  const mainConf = path.join(dataDir, 'postgresql.conf')
  if (!fs.readFileSync(mainConf, 'utf8').includes("include_if_exists = 'greybody.conf'"))
    fs.appendFileSync(mainConf, "\ninclude_if_exists = 'greybody.conf'\n")
  fs.mkdirSync(path.dirname(logFile), { recursive: true })
  if (!fs.existsSync(logFile)) fs.writeFileSync(logFile, '')
  chownToPostgres(path.join(dataDir, 'greybody.conf'))
  chownToPostgres(mainConf)
  chownToPostgres(logFile)

  const r = pgRun('pg_ctl', ['start', '-D', dataDir, '-l', logFile, '-w', '-t', '60', '-s'])
  if (r.status !== 0) throw new Error(`PostgreSQL did not start (log: ${logFile}):\n${r.stderr}${tail(logFile)}`)
  return { port, reused: false }
}

/** Stops the cluster (fast shutdown); harmless when it is not running. Returns true if it was running. */
export function stopPostgres(/** @type {string} */ dataDir) {
  if (!runningPort(dataDir)) return false
  const r = pgRun('pg_ctl', ['stop', '-D', dataDir, '-m', 'fast', '-w', '-t', '60', '-s'])
  if (r.status !== 0) throw new Error(`pg_ctl stop failed: ${r.stderr.trim()}`)
  return true
}

/**
 * Creates (or refreshes the password of) the application role and creates its database when missing.
 * @param {{ dataDir: string, port: number, role: string, password: string, database: string }} o
 */
export async function ensureRoleAndDatabase({ dataDir, port, role, password, database }) {
  const admin = new pg.Client({ host: dataDir, port, user: 'postgres', database: 'postgres' })
  await admin.connect()
  try {
    const quotedRole = `"${role.replaceAll('"', '""')}"`
    const literal = `'${password.replaceAll("'", "''")}'`
    const exists = await admin.query('select 1 from pg_roles where rolname = $1', [role])
    // CREATEDB lets tests create throw-away databases without superuser rights.
    await admin.query(`${exists.rowCount ? 'alter' : 'create'} role ${quotedRole} with login createdb password ${literal}`)
    const db = await admin.query('select 1 from pg_database where datname = $1', [database])
    if (!db.rowCount) await admin.query(`create database "${database.replaceAll('"', '""')}" owner ${quotedRole} encoding 'UTF8'`)
  } finally {
    await admin.end()
  }
}

/** Connects over TCP exactly as the app will, to prove the URL works. */
export async function checkConnection(/** @type {string} */ url) {
  const client = new pg.Client({ connectionString: url, connectionTimeoutMillis: 3000 })
  await client.connect()
  try {
    await client.query('select 1')
  } finally {
    await client.end()
  }
}
