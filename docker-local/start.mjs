#!/usr/bin/env node
// `npm start`: everything a new user needs, from a fresh clone to a running Linewise.
import { profile, serviceEnv, startServices, stopServices } from './services.mjs'
import { ensureBuild, ensureNodeModules, log, migrateAndSeed, sessionPassword, startApp, waitForHttp } from './stack.mjs'

const p = profile('dev')
let stopApp = async () => {}
let stopping = false

async function shutdown(code = 0) {
  if (stopping) return
  stopping = true
  log('stopping…')
  await stopApp()
  await stopServices(p)
  process.exit(code)
}
process.on('SIGINT', () => void shutdown(0))
process.on('SIGTERM', () => void shutdown(0))

try {
  ensureNodeModules()
  await startServices(p)
  const env = { ...process.env, ...serviceEnv(p), NUXT_SESSION_PASSWORD: sessionPassword(p.dataDir) }
  migrateAndSeed(env)
  ensureBuild()
  stopApp = startApp(env, {
    port: p.ports.app, runDir: p.runDir, restart: true,
    // The worker is restarted by startApp; the web server is the app itself, so without it everything stops.
    onExit: (name, code, signal) => {
      if (!stopping && name === 'server') {
        log(`server stopped unexpectedly (${signal ?? `exit ${code}`}); shutting down`)
        void shutdown(1)
      }
    },
  })
  const url = env.NUXT_PUBLIC_APP_URL
  await waitForHttp(`${url}/login`)
  // tsx is installed by now; it lets this plain-Node script read the TypeScript demo data.
  const { tsImport } = await import('tsx/esm/api')
  const { DEMO_USERS, DEMO_TEAM } = await tsImport('../server/seed/demo.ts', import.meta.url)
  const rows = DEMO_USERS.map((u) => `    ${u.role.padEnd(9)} ${u.email.padEnd(28)} ${u.password}`).join('\n')
  console.log(`
  Linewise is running at ${url}

  Demo sign-ins (team "${DEMO_TEAM}"):
${rows}

  Captured e-mail (invitations, password resets): ${env.LW_MAIL_UI_URL}
  Data lives in .data/dev/. Press Ctrl-C to stop everything.
`)
} catch (e) {
  console.error(`[linewise] ${e.message}`)
  await shutdown(1)
}
