// The parts of the content security policy that depend on the deployment, added once at start-up to the policy
// nuxt-security builds from nuxt.config.ts: images and direct uploads go to the object store's origin (presigned
// URLs), map tiles to the configured tile server, and HSTS / upgrade-insecure-requests only when the app is served
// over https (browsers ignore HSTS over http, and upgrading a local http object store would break its images).
// Nitro runs this plugin before the module's own plugins, so the hook is registered before the policy is read.

type Csp = Record<string, string[] | string | boolean>

function add(csp: Csp, directive: string, sources: string[]): void {
  const current = csp[directive]
  const list = Array.isArray(current) ? current : typeof current === 'string' ? current.split(' ').filter(Boolean) : []
  csp[directive] = [...new Set([...list, ...sources])]
}

export default defineNitroPlugin((nitroApp) => {
  const config = useRuntimeConfig()
  const https = String(config.appUrl).startsWith('https://')
  const storage = storageOrigins(config.s3Endpoint, config.s3Bucket || 'greybody', config.s3Region || 'us-east-1')
  const tiles = config.public.mapTileUrl ? tileOrigin(String(config.public.mapTileUrl)) : null

  nitroApp.hooks.hook('nuxt-security:routeRules', (routeRules) => {
    const rules = routeRules['/**']
    const headers = rules?.headers
    if (!headers || !headers.contentSecurityPolicy) return
    const csp = headers.contentSecurityPolicy as Csp
    add(csp, 'img-src', [...storage, ...(tiles ? [tiles] : [])])
    // The browser PUTs images straight to the object store.
    add(csp, 'connect-src', storage)
    if (https) {
      csp['upgrade-insecure-requests'] = true
      headers.strictTransportSecurity = { maxAge: 31_536_000, includeSubdomains: true }
    }
  })
})
