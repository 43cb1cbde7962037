import { startNginx } from '../../scripts/lib/nginx.mjs'
import { type AppProcess, freePort, startAppProcess, stopAppProcess } from './app-process'
import { PROFILE, ROOT } from './env'

// Several processes of the built server against the profile's one database, object storage and SMTP, and
// nginx in front of them (its files in .data/<profile>/nginx/). The instances know nginx's address as their own
// (NUXT_APP_URL, AUTH_ORIGIN), as they would behind a load balancer.

export interface Cluster {
  /** nginx's address: the app's public URL. */
  url: string
  apps: AppProcess[]
  nginx: Awaited<ReturnType<typeof startNginx>>
  /** Stops nginx and every instance still running; safe to call twice. */
  stop(): Promise<void>
}

/** Starts `instances` app processes (with `extra` variables) and nginx in front of them. */
export async function startCluster(extra: Record<string, string> = {}, instances = 2): Promise<Cluster> {
  const port = await freePort()
  const url = `http://127.0.0.1:${port}`
  const apps: AppProcess[] = []
  let nginx: Cluster['nginx'] | undefined
  const stop = async () => {
    await nginx?.stop()
    await Promise.all(apps.map((a) => stopAppProcess(a)))
  }
  try {
    const started = await Promise.allSettled(Array.from({ length: instances }, () => startAppProcess({
      NUXT_APP_URL: url, AUTH_ORIGIN: `${url}/api/auth`, NUXT_TRUST_PROXY: '1', ...extra,
    })))
    for (const s of started) if (s.status === 'fulfilled') apps.push(s.value)
    const failed = started.find((s) => s.status === 'rejected')
    if (failed) throw (failed as PromiseRejectedResult).reason
    nginx = await startNginx({ dir: `${ROOT}.data/${PROFILE}/nginx`, port, upstreams: apps.map((a) => a.port) })
  } catch (err) {
    await stop()
    throw err
  }
  return { url, apps, nginx, stop }
}

/** The instance port that finally answered a request through nginx (after any retry), from X-Greybody-Upstream. */
export function upstreamPort(headers: Headers): number | null {
  const list = headers.get('x-greybody-upstream')
  if (!list) return null
  return Number(list.split(',').pop()!.trim().split(':').pop())
}

/** The scheduled moments (ISO) of the notices scheduler's ticks an instance claimed, and those it left to another. */
export function tickSlots(log: string[]): { claimed: string[]; skipped: string[] } {
  const slotsOf = (word: string) => log
    .map((l) => new RegExp(`${word} notices-tick (\\d{4}-\\d\\d-\\d\\dT[\\d:.]+Z)`).exec(l)?.[1])
    .filter((s): s is string => !!s)
  return { claimed: slotsOf('claimed'), skipped: slotsOf('skipped') }
}

/** Polls `fn` until it returns something truthy. */
export async function waitFor<T>(what: string, fn: () => Promise<T | undefined | null | false>, timeoutMs = 20_000): Promise<T> {
  const until = Date.now() + timeoutMs
  while (Date.now() < until) {
    const v = await fn()
    if (v) return v
    await new Promise((r) => setTimeout(r, 150))
  }
  throw new Error(`timed out waiting for ${what}`)
}
