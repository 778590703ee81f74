/**
 * The browser PUTs uploads straight to S3 with presigned URLs, so the page's
 * Content-Security-Policy must allow connecting to the storage endpoint, which is only
 * known at run time (NUXT_S3_ENDPOINT; without one, AWS's virtual-hosted bucket address).
 */
export function storageOrigin(c: { s3Endpoint?: string; s3Bucket: string; s3Region: string }): string {
  if (c.s3Endpoint) return new URL(c.s3Endpoint).origin
  return `https://${c.s3Bucket}.s3.${c.s3Region}.amazonaws.com`
}

export default defineNitroPlugin((nitroApp) => {
  const origin = storageOrigin(useRuntimeConfig())
  nitroApp.hooks.hook('nuxt-security:routeRules', (rules) => {
    const all = rules['/**']
    const csp = all?.headers && typeof all.headers.contentSecurityPolicy === 'object' ? all.headers.contentSecurityPolicy : null
    if (!csp) return
    const connect = Array.isArray(csp['connect-src']) ? csp['connect-src'] : ["'self'"]
    if (!connect.includes(origin)) csp['connect-src'] = [...connect, origin]
  })
  // The module called the hook while starting, maybe before this plugin was registered: call it again.
  void nitroApp.hooks.callHook('nuxt-security:ready')
})
