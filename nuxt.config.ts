// Nuxt's source directory is the repository root (see DEVELOPERS.md).
const profile = process.env.GREYBODY_TEST_PROFILE
const outputDir = profile && profile !== 'test' ? `.output-${profile}` : '.output'

export default defineNuxtConfig({
  compatibilityDate: '2026-11-01',
  srcDir: '.',
  ssr: true,
  devtools: { enabled: false },
  telemetry: false,
  modules: ['@nuxtjs/tailwindcss', '@pinia/nuxt', '@sidebase/nuxt-auth', 'nuxt-security'],
  css: ['~/assets/css/main.css'],
  tailwindcss: { cssPath: '~/assets/css/main.css' },
  app: {
    head: {
      htmlAttrs: { lang: 'en' },
      title: 'Greybody',
      meta: [
        { name: 'viewport', content: 'width=device-width, initial-scale=1' },
        { name: 'theme-color', content: '#1c1917' },
      ],
      link: [{ rel: 'icon', type: 'image/svg+xml', href: '/favicon.svg' }],
    },
  },
  auth: {
    isEnabled: true,
    disableServerSideAuth: false,
    originEnvKey: 'AUTH_ORIGIN',
    baseURL: process.env.AUTH_ORIGIN || 'http://127.0.0.1:3000/api/auth',
    provider: { type: 'authjs', defaultProvider: 'credentials', addDefaultCallbackUrl: false },
    sessionRefresh: { enablePeriodically: false, enableOnWindowFocus: true },
    globalAppMiddleware: false,
  },
  runtimeConfig: {
    authSecret: '',
    databaseUrl: '',
    appUrl: 'http://127.0.0.1:3000',
    devMailbox: '',
    mailCatcherUrl: '',
    smtpUrl: '',
    mailFrom: 'Greybody <no-reply@greybody.local>',
    s3Endpoint: '',
    s3Region: 'us-east-1',
    s3Bucket: 'greybody',
    s3AccessKeyId: '',
    s3SecretAccessKey: '',
    stripeSecretKey: '',
    stripeApiHost: '',
    stripeApiPort: '',
    stripeApiProtocol: '',
    stripeWebhookSecret: '',
    signInLimit: '10',
    signInWindowSeconds: '900',
    public: {
      devMailbox: '',
      // Production may point the map at a tile server; without one the map draws the land outline shipped with the app.
      mapTileUrl: '',
      mapTileAttribution: '',
    },
  },
  // Security headers and the content security policy (nuxt-security). The object-storage and map-tile origins, HSTS and
  // upgrade-insecure-requests depend on the deployment and are added at start-up by server/plugins/security-policy.ts.
  security: {
    // Each page gets a fresh nonce that the module writes on every <script>, <style> and <link> Nuxt renders.
    nonce: true,
    headers: {
      contentSecurityPolicy: {
        'default-src': ["'self'"],
        'base-uri': ["'none'"],
        'object-src': ["'none'"],
        // Only the scripts this server rendered (nonce) and what they load; no inline handlers, no eval.
        'script-src': ["'self'", "'nonce-{{nonce}}'", "'strict-dynamic'"],
        'script-src-attr': ["'none'"],
        'style-src': ["'self'", "'nonce-{{nonce}}'"],
        // Vue renders bound styles (bar widths, band swatches) as style attributes; attributes cannot run script.
        'style-src-attr': ["'unsafe-inline'"],
        // data:/blob: for small images the build inlines and for canvases turned into pictures.
        'img-src': ["'self'", 'data:', 'blob:'],
        'font-src': ["'self'", 'data:'],
        'connect-src': ["'self'"],
        'worker-src': ["'self'"],
        'form-action': ["'self'"],
        'frame-ancestors': ["'none'"],
        'upgrade-insecure-requests': false,
      },
      // Cross-origin isolation is not needed, and object-storage images carry no CORP header.
      crossOriginEmbedderPolicy: false,
      crossOriginOpenerPolicy: 'same-origin',
      crossOriginResourcePolicy: 'same-origin',
      // Not no-referrer: with it browsers send "Origin: null" on the app's own POSTs, which the cross-site check refuses.
      referrerPolicy: 'strict-origin-when-cross-origin',
      // Browsers ignore HSTS over http; it is sent only when NUXT_APP_URL is https (server/plugins/security-policy.ts).
      strictTransportSecurity: false,
      xContentTypeOptions: 'nosniff',
      xFrameOptions: 'DENY',
      permissionsPolicy: {
        accelerometer: [], autoplay: [], camera: [], 'display-capture': [], 'encrypted-media': [], fullscreen: [],
        geolocation: [], gyroscope: [], magnetometer: [], microphone: [], midi: [], payment: [], 'picture-in-picture': [],
        'publickey-credentials-get': [], 'screen-wake-lock': [], usb: [], 'xr-spatial-tracking': [],
      },
    },
    // No body sent to the app is large: images go straight to object storage. The two exceptions are in routeRules.
    requestSizeLimiter: { maxRequestSizeInBytes: 2_000_000, maxUploadFileRequestInBytes: 2_000_000, throwError: true },
    // Sign-in and API-token limits are counted in PostgreSQL (shared by every instance); an in-memory one would not be.
    rateLimiter: false,
    // Would refuse ordinary text such as "rise <5 K" in a note; output is escaped by Vue instead.
    xssValidator: false,
    // The API offers no cross-origin browser access: without CORS headers other sites cannot read its answers.
    corsHandler: false,
    allowedMethodsRestricter: false,
    // Keep the client bundle as built (the module would strip console calls).
    removeLoggers: false,
    // State-changing requests are checked by Origin in server/middleware/cross-site.ts instead of a token.
    csrf: false,
  },
  routeRules: {
    // JSON answers carry no HTML to put a nonce on: none is made for them.
    '/api/**': { security: { nonce: false } },
    // A temperature grid arrives as JSON text: up to 20 000 000 characters of CSV plus escapes.
    '/api/orgs/*/surveys/*/grids': { security: { requestSizeLimiter: { maxRequestSizeInBytes: 24_000_000, maxUploadFileRequestInBytes: 2_000_000 } } },
    // A register import piece: up to 1 000 000 characters, up to 3 bytes each in UTF-8.
    '/api/orgs/*/register-imports/*/chunks': { security: { requestSizeLimiter: { maxRequestSizeInBytes: 4_000_000, maxUploadFileRequestInBytes: 2_000_000 } } },
  },
  // A parallel test profile (GREYBODY_TEST_PROFILE=test-N) builds into its own folders so runs do not collide.
  ...(process.env.GREYBODY_TEST_PROFILE && process.env.GREYBODY_TEST_PROFILE !== 'test'
    ? { buildDir: `node_modules/.cache/nuxt/.nuxt-${process.env.GREYBODY_TEST_PROFILE}` }
    : {}),
  nitro: {
    preset: 'node-server',
    output: { dir: outputDir },
    // useEvent() anywhere in a request: server/utils/db.ts reads the request's organisation for the tenant wall.
    experimental: { asyncContext: true },
  },
  typescript: { strict: true },
})
