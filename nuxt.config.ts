// https://nuxt.com/docs/api/configuration/nuxt-config
export default defineNuxtConfig({
  compatibilityDate: '2025-07-15',
  devtools: { enabled: false },
  modules: ['@pinia/nuxt', '@nuxtjs/tailwindcss', 'nuxt-auth-utils', 'nuxt-security', '@nuxt/eslint'],
  css: ['@fontsource/inter/400.css', '@fontsource/inter/500.css', '@fontsource/inter/600.css', '@fontsource/roboto-mono/400.css', '@fontsource/roboto-mono/500.css'],
  tailwindcss: { cssPath: '~/assets/css/tailwind.css' },
  app: {
    head: {
      title: 'Linewise',
      htmlAttrs: { lang: 'en' },
      meta: [{ name: 'description', content: 'Video level checks against your delivery spec' }],
      link: [{ rel: 'icon', type: 'image/svg+xml', href: '/favicon.svg' }],
    },
  },
  // Every value here is overridden at run time by NUXT_<NAME> (e.g. NUXT_DATABASE_URL);
  // the worker reads the same variables, so one set of settings drives both processes.
  runtimeConfig: {
    databaseUrl: '',
    redisUrl: '',
    s3Endpoint: '',
    s3Region: 'us-east-1',
    s3Bucket: 'linewise',
    s3AccessKeyId: '',
    s3SecretAccessKey: '',
    smtpUrl: '',
    mailFrom: 'Linewise <no-reply@linewise.local>',
    session: {
      name: 'linewise-session',
      maxAge: 60 * 60 * 24 * 7,
      // Secure unless NUXT_SESSION_COOKIE_SECURE=false (the local stack on plain http sets that).
      cookie: { sameSite: 'lax', httpOnly: true, secure: true },
    },
    public: {
      appUrl: 'http://127.0.0.1:3000',
    },
  },
  vite: {
    // Nuxt leaves shared/ external in the SSR bundle for Nitro to inline; relative external
    // paths break when the production build lives in node_modules/.cache, absolute ones do not.
    build: { rollupOptions: { makeAbsoluteExternalsRelative: false } },
    $client: {
      build: {
        rollupOptions: {
          output: {
            // The charts' renderer (zrender) in a chunk of its own beside ECharts' line chart:
            // the two load together when a chart first shows, and neither passes 500 kB.
            manualChunks: (id: string) => (id.includes('/node_modules/zrender/') ? 'zrender' : undefined),
          },
        },
      },
    },
  },
  nitro: {
    experimental: { tasks: false },
  },
  // Response headers on every page and API answer (nuxt-security 2.5.1). The Content-Security-
  // Policy gives Nuxt's own inline script a per-response nonce; the S3 endpoint that presigned
  // uploads go to is added to connect-src at start from NUXT_S3_ENDPOINT
  // (server/plugins/csp-storage.ts). Body size, Origin and content-type checks are ours
  // (server/middleware/01.request-guard.ts): the module's limiter trusts Content-Length and
  // would refuse uploads, and its rate limiter and XSS validator are left off (sign-in has
  // its own throttling; output is encoded where it is written).
  security: {
    nonce: true,
    sri: true,
    hidePoweredBy: true,
    removeLoggers: false,
    rateLimiter: false,
    requestSizeLimiter: false,
    xssValidator: false,
    corsHandler: false,
    allowedMethodsRestricter: false,
    csrf: false,
    headers: {
      // Off: nothing here needs cross-origin isolation (no SharedArrayBuffer).
      crossOriginEmbedderPolicy: false,
      crossOriginResourcePolicy: 'same-origin',
      crossOriginOpenerPolicy: 'same-origin',
      referrerPolicy: 'same-origin',
      xFrameOptions: 'DENY',
      contentSecurityPolicy: {
        'default-src': ["'self'"],
        'base-uri': ["'none'"],
        'connect-src': ["'self'"],
        'font-src': ["'self'", 'data:'],
        'form-action': ["'self'"],
        'frame-ancestors': ["'none'"],
        'img-src': ["'self'", 'data:', 'blob:'],
        'object-src': ["'none'"],
        'script-src-attr': ["'none'"],
        // Vue and ECharts set style attributes; no script runs from them.
        'style-src': ["'self'", "'unsafe-inline'"],
        'script-src': ["'self'", "'strict-dynamic'", "'nonce-{{nonce}}'"],
        'worker-src': ["'self'", 'blob:'],
        // Off: the local stack serves plain http; a deployment behind TLS gets HSTS instead.
        'upgrade-insecure-requests': false,
      },
    },
  },
  typescript: { strict: true },
})
