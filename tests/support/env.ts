import { existsSync, readFileSync } from 'node:fs'
import { execFileSync } from 'node:child_process'
import { fileURLToPath } from 'node:url'

export const ROOT = fileURLToPath(new URL('../..', import.meta.url))
/** The services profile the tests use: `test`, or `test-1` … `test-9` to run beside another test run. */
export const PROFILE = process.env.GREYBODY_TEST_PROFILE || 'test'
/** The built app the e2e and browser tests start (a parallel profile builds into its own folder). */
export const OUTPUT_DIR = PROFILE === 'test' ? '.output' : `.output-${PROFILE}`
const ENV_FILE = `${ROOT}.data/${PROFILE}/services.env`

/** The test profile's service configuration; starts the services when they are not running yet. */
export function testEnv(): Record<string, string> {
  if (!existsSync(ENV_FILE) || !process.env.GREYBODY_SERVICES_STARTED) {
    execFileSync('node', ['scripts/services.mjs', 'start', '--profile', PROFILE], { cwd: ROOT, stdio: 'inherit' })
    process.env.GREYBODY_SERVICES_STARTED = '1'
  }
  const env: Record<string, string> = {}
  for (const line of readFileSync(ENV_FILE, 'utf8').split('\n')) {
    const m = /^([A-Z0-9_]+)=(.*)$/.exec(line.trim())
    if (m) env[m[1]!] = m[2]!.replace(/^"(.*)"$|^'(.*)'$/, '$1$2')
  }
  return env
}
