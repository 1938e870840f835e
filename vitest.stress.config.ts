import { defineConfig } from 'vitest/config'

// `npm run test:stress`: the browser over the stress scale (101,000 detectors, 2.1 million events).
// Minutes of seeding and scrolling, so it stays out of `npm test`.
export default defineConfig({
  resolve: { tsconfigPaths: true },
  test: {
    include: ['tests/stress/**/*.test.ts'],
    environment: 'node',
    globalSetup: ['tests/setup/global-setup-stress.ts'],
    setupFiles: ['tests/setup/console-guard.ts'],
    testTimeout: 120_000,
    hookTimeout: 600_000,
    maxWorkers: 1,
  },
})
