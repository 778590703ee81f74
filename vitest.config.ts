import { defineConfig } from 'vitest/config'

// Projects: `unit` (pure code, no services), `integration` (HTTP against the app that
// `npm test` serves, with real MariaDB, Redis, S3 fake and SMTP catcher) and `browser`
// (Debian's chromium through playwright-core against the same app). The last two share
// one server, so their files run one at a time.
export default defineConfig({
  test: {
    projects: [
      {
        test: { name: 'unit', include: ['tests/unit/**/*.test.ts'], environment: 'node', testTimeout: 60_000 },
      },
      {
        test: { name: 'integration', include: ['tests/integration/**/*.test.ts'], environment: 'node', fileParallelism: false, testTimeout: 60_000, hookTimeout: 120_000 },
      },
      {
        test: { name: 'browser', include: ['tests/browser/**/*.test.ts'], environment: 'node', fileParallelism: false, testTimeout: 120_000, hookTimeout: 120_000 },
      },
    ],
  },
})
