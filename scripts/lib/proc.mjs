// Child-process helpers for the service scripts.
import { spawnSync } from 'node:child_process'
import fs from 'node:fs'

/** True when a process with this id exists (it may belong to someone else: check its command line too). */
export function isAlive(/** @type {number | null | undefined} */ pid) {
  if (!pid) return false
  try {
    process.kill(pid, 0)
  } catch (err) {
    return /** @type {NodeJS.ErrnoException} */ (err).code === 'EPERM'
  }
  // A zombie (exited, not yet reaped: containers whose PID 1 does not reap) is not running.
  try {
    const stat = fs.readFileSync(`/proc/${pid}/stat`, 'utf8')
    return stat.slice(stat.lastIndexOf(')') + 2, stat.lastIndexOf(')') + 3) !== 'Z'
  } catch {
    return true
  }
}

/** The command line of a running process, '' when unknown (Linux /proc). */
export function commandLine(/** @type {number} */ pid) {
  try {
    return fs.readFileSync(`/proc/${pid}/cmdline`, 'utf8').split('\0').join(' ').trim()
  } catch {
    return ''
  }
}

/**
 * Runs a command to completion and returns its exit status and output; never throws on a non-zero exit.
 * @param {string} cmd
 * @param {string[]} args
 * @param {{ inherit?: boolean, env?: NodeJS.ProcessEnv, cwd?: string }} [options] inherit streams output to the terminal
 */
export function run(cmd, args, { inherit = false, env, cwd } = {}) {
  const result = spawnSync(cmd, args, { stdio: inherit ? 'inherit' : 'pipe', encoding: 'utf8', env: env ?? process.env, cwd })
  if (result.error) return { status: 127, stdout: '', stderr: result.error.message }
  return { status: result.status ?? 1, stdout: result.stdout ?? '', stderr: result.stderr ?? '' }
}

/** Last lines of a log file, for error messages. */
export function tail(/** @type {string} */ file, lines = 20) {
  try {
    return fs.readFileSync(file, 'utf8').trimEnd().split('\n').slice(-lines).join('\n')
  } catch {
    return '(no log yet)'
  }
}

/** Sends SIGTERM, waits, then SIGKILL; resolves true when the process is gone. */
export async function terminate(/** @type {number} */ pid, graceMs = 8000) {
  if (!isAlive(pid)) return true
  try {
    process.kill(pid, 'SIGTERM')
  } catch {
    return !isAlive(pid)
  }
  const deadline = Date.now() + graceMs
  while (Date.now() < deadline) {
    if (!isAlive(pid)) return true
    await new Promise((r) => setTimeout(r, 100))
  }
  try {
    process.kill(pid, 'SIGKILL')
  } catch {
    // already gone
  }
  await new Promise((r) => setTimeout(r, 200))
  return !isAlive(pid)
}
