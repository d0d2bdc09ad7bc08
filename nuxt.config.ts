import { join } from 'node:path'
import { fileURLToPath } from 'node:url'

const migrationsDir = fileURLToPath(new URL('./drizzle', import.meta.url))
// The guides' Markdown, bundled into the server as assets (server/utils/guides/guides.ts).
const guidesDir = fileURLToPath(new URL('./content/guides', import.meta.url))
// The surface analysis' second thread (server/audio/parallel.ts), bundled on its own beside the server's entry.
const spectrumWorkerEntry = fileURLToPath(new URL('./server/audio/spectrumWorker.ts', import.meta.url))

export default defineNuxtConfig({
  modules: ['@nuxtjs/tailwindcss', 'nuxt-auth-utils', '@nuxt/image', '@nuxt/eslint', 'nuxt-security', '@nuxtjs/mdc'],
  devtools: { enabled: false },
  app: {
    head: {
      htmlAttrs: { lang: 'en' },
      titleTemplate: '%s · Groovewright',
      meta: [
        { name: 'viewport', content: 'width=device-width, initial-scale=1' },
        { name: 'description', content: 'New wax cylinder records, blanks and personal messages, made and tested by hand.' },
      ],
      link: [
        { rel: 'icon', type: 'image/svg+xml', href: '/favicon.svg' },
        // The heading face and the text face, fetched with the page rather than after its CSS (app/assets/css/fonts.css).
        { rel: 'preload', as: 'font', type: 'font/woff2', href: '/fonts/fraunces-latin-700-v5.woff2', crossorigin: 'anonymous' },
        { rel: 'preload', as: 'font', type: 'font/woff2', href: '/fonts/ibm-plex-sans-latin-400-v5.woff2', crossorigin: 'anonymous' },
      ],
      script: [
        // Before any bundle runs: zod's schemas skip their speed-up through `new Function`, whose probe the
        // CSP below (no 'unsafe-eval') would report as a violation on every page (README "Security").
        { innerHTML: 'globalThis.__zod_globalConfig = Object.assign(globalThis.__zod_globalConfig || {}, { jitless: true })', tagPriority: 'critical' },
      ],
    },
  },
  css: ['~/assets/css/fonts.css'],
  // Guides are Markdown rendered on the server (/guides): no code highlighting (no inline styles for the CSP), plain headings.
  mdc: {
    highlight: false,
    headings: { anchorLinks: false },
  },
  runtimeConfig: {
    // Every key can be set at run time with NUXT_<KEY> (e.g. NUXT_DB_DIR, NUXT_SMTP_PORT).
    dbDir: '.data/db',
    // Small files the server keeps (the backup key); `npm start` keeps the session password here too.
    dataDir: '.data',
    // Where POST /api/backup (npm run backup) writes its archives.
    backupDir: 'backups',
    // The sign-in cookie lives 30 days from its last renewal; server/utils/account/auth.ts renews it, with the
    // session's row, at most once a day of use. The row decides: after sign-out the cookie is dead.
    session: { cookie: { maxAge: 60 * 60 * 24 * 30 } },
    // Uploaded photos and audio samples (Nitro storage `uploads`): `fs` keeps them in `uploadsDir`;
    // `build` keeps the mount of nitro.storage.uploads below as built (e.g. shared S3-compatible storage).
    uploadsDriver: 'fs',
    uploadsDir: '.data/uploads',
    migrationsDir,
    seedDemo: 'true',
    // 'true' behind a proxy or load balancer that sets X-Forwarded-For (rate limits per client address).
    trustProxy: 'false',
    siteUrl: 'http://localhost:3000',
    smtpHost: '127.0.0.1',
    smtpPort: 2525,
    smtpSecure: 'false',
    smtpUser: '',
    smtpPass: '',
    mailFrom: 'Groovewright demo workshop <workshop@groovewright.test>',
    mailPollMs: 2000,
    mailMaxBackoffMs: 300_000,
    resetTtlSeconds: 3600,
    // Payments: by default the local fake (fakes/stripe) on 127.0.0.1:12111 through the real SDK.
    // For the real service set a real secret key and NUXT_STRIPE_API_HOST to an empty string.
    stripeSecretKey: 'sk_test_local_fake_key',
    stripeApiHost: '127.0.0.1',
    stripeApiPort: 12111,
    stripeApiProtocol: 'http',
    stripeWebhookSecret: 'whsec_local_fake',
    checkoutHoldMinutes: 30,
    public: {
      shopName: 'Groovewright demo workshop',
      // Largest surface-test recording taken, MB (a shop setting; checked before the body is read).
      surfaceTestMaxMb: 60,
      siteUrl: 'http://localhost:3000',
      // No payment script runs in the browser: checkout redirects to the hosted page's own address
      // (the session's `url`), so no publishable key is needed, and in fake mode nothing outside loads.
    },
  },
  routeRules: {
    // Font files carry a version in their names (app/assets/css/fonts.css).
    '/fonts/**': { headers: { 'cache-control': 'public, max-age=31536000, immutable' } },
    // Answers with personal data (orders, addresses, accounts, exports) are never stored by a cache.
    '/api/**': { headers: { 'cache-control': 'no-store', 'content-security-policy': 'default-src \'none\'; frame-ancestors \'none\'' } },
    '/account': { headers: { 'cache-control': 'no-store' } },
    '/account/**': { headers: { 'cache-control': 'no-store' } },
    '/orders/**': { headers: { 'cache-control': 'no-store' } },
    '/certificates/**': { headers: { 'cache-control': 'no-store' } },
    '/checkout/**': { headers: { 'cache-control': 'no-store' } },
    '/cart': { headers: { 'cache-control': 'no-store' } },
    '/dispatch': { headers: { 'cache-control': 'no-store' } },
    '/dispatch/**': { headers: { 'cache-control': 'no-store' } },
    '/workshop': { headers: { 'cache-control': 'no-store' } },
    '/workshop/**': { headers: { 'cache-control': 'no-store' } },
    '/setup': { headers: { 'cache-control': 'no-store' } },
    '/reset': { headers: { 'cache-control': 'no-store' } },
  },
  compatibilityDate: '2026-11-01',
  // Response headers (README "Security"). Pages: a CSP with a fresh nonce per request for inline
  // scripts, no framing, no referrer to other sites. The module's request-size limiter, rate limiter,
  // CORS handler and XSS filter are off: server/middleware/body-limit.ts and each upload route check
  // sizes, server/utils/account/throttle.ts limits sign-in, no other origin may call the API, and the XSS
  // filter would refuse honest text with "<" in it and read whole uploads before their size is checked.
  security: {
    nonce: true,
    headers: {
      contentSecurityPolicy: {
        'default-src': ['\'self\''],
        'base-uri': ['\'none\''],
        'object-src': ['\'none\''],
        'frame-ancestors': ['\'none\''],
        'frame-src': ['\'none\''],
        'form-action': ['\'self\''],
        // Every script is our own bundle or an inline script carrying this response's nonce.
        'script-src': ['\'self\'', '\'nonce-{{nonce}}\''],
        // No inline event handlers but one: @nuxt/image's server-rendered <img onerror> marking a photo that
        // failed before the page woke up, allowed by its hash alone.
        'script-src-attr': ['\'unsafe-hashes\'', '\'sha256-bwK6T5wZVTANitXbrTsel7kl/PyCjCd/Dq5Qoz3imjM=\''],
        // Vue renders style="" attributes (bars, swatches, chart sizes).
        'style-src': ['\'self\'', '\'unsafe-inline\''],
        // data: for the blank labels' barcode SVG; blob: for a recording chosen on the analysis page.
        'img-src': ['\'self\'', 'data:', 'blob:'],
        'media-src': ['\'self\'', 'blob:'],
        'font-src': ['\'self\'', 'data:'],
        'connect-src': ['\'self\''],
        'worker-src': ['\'self\''],
        'manifest-src': ['\'self\''],
        // Served over plain http on localhost in the demo; a TLS proxy in front adds its own.
        'upgrade-insecure-requests': false,
      },
      crossOriginEmbedderPolicy: 'credentialless',
      crossOriginOpenerPolicy: 'same-origin',
      crossOriginResourcePolicy: 'same-origin',
      referrerPolicy: 'same-origin',
      strictTransportSecurity: false,
      xContentTypeOptions: 'nosniff',
      xFrameOptions: 'DENY',
    },
    hidePoweredBy: true,
    corsHandler: false,
    rateLimiter: false,
    requestSizeLimiter: false,
    xssValidator: false,
    allowedMethodsRestricter: false,
    removeLoggers: false,
  },
  // GW_BUILD_DIR / GW_OUTPUT_DIR let two builds of one checkout live side by side (e.g. a second worktree's tests).
  ...(process.env.GW_BUILD_DIR ? { buildDir: process.env.GW_BUILD_DIR } : {}),
  // GW_CLIENT_SOURCEMAP=1 writes source maps of the browser bundle (not linked from the scripts), to see what each chunk holds.
  ...(process.env.GW_CLIENT_SOURCEMAP ? { sourcemap: { client: 'hidden' as const } } : {}),
  // The stores (app/stores) are auto-imported like composables. pinia comes without its Nuxt module: the cart
  // store makes the app's pinia on first use (app/stores/cartPinia.ts), so pages without the cart load none of it.
  imports: { dirs: ['stores'] },
  experimental: {
    // No client-side route rules are used (ours only set response headers), so the pages need not fetch the
    // build manifest (/_nuxt/builds/meta) nor carry the code that reads it.
    appManifest: false,
    // A link fetches its page's code when it is pointed at or focused, not whenever it scrolls into view:
    // a catalogue page shows some forty links, whose pages would otherwise load while the phone is still busy.
    defaults: { nuxtLink: { prefetchOn: { visibility: false, interaction: true } } },
    // The page's state goes to the browser as a script (window.__NUXT__) rather than as JSON to be revived:
    // the state holds plain data only (no refs, no pinia), and the browser is spared devalue's reader.
    renderJsonPayloads: false,
  },
  nitro: {
    ...(process.env.GW_OUTPUT_DIR ? { output: { dir: process.env.GW_OUTPUT_DIR } } : {}),
    // The guides (content/guides/*.md) and the slip's fonts (server/assets/fonts) travel inside the built server.
    serverAssets: [{ baseName: 'guides', dir: guidesDir }],
    // Build assets are stored compressed beside the originals and served so to clients that take br or gzip;
    // pages and JSON are compressed as they go out (server/plugins/compression.ts).
    compressPublicAssets: { gzip: true, brotli: true },
    storage: {
      // Re-mounted at run time at `uploadsDir` (NUXT_UPLOADS_DIR) by server/utils/platform/uploads.ts, unless
      // NUXT_UPLOADS_DRIVER=build: then this mount is used as it is (put a shared driver here).
      uploads: { driver: 'fs', base: '.data/uploads' },
    },
    // Node 20 runs ES2022 (BigInt literals in the money and length engines among it).
    esbuild: { options: { target: 'es2022' } },
    externals: {
      // PGlite loads its WASM and data files next to its own module at run time.
      external: ['@electric-sql/pglite'],
    },
  },
  vite: {
    // Every component is written with <script setup> / setup(): the Options API's runtime is left out of the bundle.
    define: { __VUE_OPTIONS_API__: 'false' },
    // Browsers that run this app's module scripts know <link rel=modulepreload>; no polyfill for it in the entry.
    build: { modulePreload: { polyfill: false } },
  },
  typescript: {
    strict: true,
  },
  telemetry: false,
  hooks: {
    'nitro:init'(nitro) {
      nitro.hooks.hook('compiled', async () => {
        const { build } = await import('esbuild')
        await build({
          entryPoints: [spectrumWorkerEntry],
          outfile: join(nitro.options.output.serverDir, 'audio-spectrum-worker.mjs'),
          bundle: true,
          platform: 'node',
          format: 'esm',
          target: 'node20',
          logLevel: 'warning',
        })
      })
    },
  },
  // Who is signed in comes from our own /api/auth/me (app/plugins/current-user.ts); the module's session
  // fetch on every render and its client plugin are not used.
  auth: { loadStrategy: 'none' },
  eslint: {
    config: { stylistic: true },
  },
  image: {
    // Photos are re-encoded on upload and served by /files/<id>; no resizing service in between.
    provider: 'none',
  },
  tailwindcss: {
    cssPath: '~/assets/css/tailwind.css',
  },
})
