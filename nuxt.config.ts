// https://nuxt.com/docs/api/configuration/nuxt-config
export default defineNuxtConfig({
  compatibilityDate: '2025-07-15',
  devtools: { enabled: false },
  modules: ['@pinia/nuxt', '@nuxtjs/tailwindcss', 'nuxt-auth-utils', '@nuxt/eslint'],
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
  typescript: { strict: true },
})
