import { defineConfig } from 'vitest/config'

// `npm run test:proof`: the long runs (hostile input on every route, a killed server mid-write,
// accessibility on every page at two widths). Minutes, so they stay out of `npm test`.
export default defineConfig({
  resolve: { tsconfigPaths: true },
  test: {
    include: ['tests/proof/**/*.test.ts'],
    environment: 'node',
    globalSetup: ['tests/setup/global-setup.ts'],
    setupFiles: ['tests/setup/console-guard.ts'],
    testTimeout: 1_800_000,
    hookTimeout: 300_000,
    maxWorkers: 1,
  },
})
