// Nuxt's source directory is the repository root (see DEVELOPERS.md).
const profile = process.env.GREYBODY_TEST_PROFILE
const outputDir = profile && profile !== 'test' ? `.output-${profile}` : '.output'

export default defineNuxtConfig({
  compatibilityDate: '2026-11-01',
  srcDir: '.',
  ssr: true,
  devtools: { enabled: false },
  telemetry: false,
  modules: ['@nuxtjs/tailwindcss', '@pinia/nuxt', '@sidebase/nuxt-auth'],
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
  // A parallel test profile (GREYBODY_TEST_PROFILE=test-N) builds into its own folders so runs do not collide.
  ...(process.env.GREYBODY_TEST_PROFILE && process.env.GREYBODY_TEST_PROFILE !== 'test'
    ? { buildDir: `node_modules/.cache/nuxt/.nuxt-${process.env.GREYBODY_TEST_PROFILE}` }
    : {}),
  nitro: {
    preset: 'node-server',
    output: { dir: outputDir },
  },
  typescript: { strict: true },
})
